/** Roles per rig, in rising order of what they may do (PRODUCT.md). Shared by server and UI. */
export const rigRoles = ["guest", "crew", "owner"] as const;
export type Role = (typeof rigRoles)[number];

export function roleRank(role: Role): number {
  return rigRoles.indexOf(role);
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
