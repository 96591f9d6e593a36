/**
 * Roles per rig (PRODUCT.md): the one list, shared by the database enum (`app/db/schema.ts`),
 * the forms, the sync protocol and the phone's store. Listed in the database enum's order.
 */
import { z } from "zod";

export const rigRoles = ["owner", "crew", "guest"] as const;
export type Role = (typeof rigRoles)[number];
export const roleSchema = z.enum(rigRoles, { error: "Choose owner, crew or guest." });

/** What a role may do, rising: guest < crew < owner. */
const rank: Record<Role, number> = { guest: 0, crew: 1, owner: 2 };

export function roleRank(role: Role): number {
  return rank[role];
}

/** True when `role` is at least `minimum` (guest < crew < owner). */
export function hasRole(role: Role | null | undefined, minimum: Role): boolean {
  return role != null && roleRank(role) >= roleRank(minimum);
}

export const roleLabel: Record<Role, string> = { owner: "Owner", crew: "Crew", guest: "Guest" };

export const roleHelp: Record<Role, string> = {
  owner: "Everything, including the wiring model, drafts and who is on the rig.",
  crew: "Logs readings, switches loads and chooses modes. No model edits.",
  guest: "Read-only. Sees the bank and may subscribe to alerts.",
};
