/** The forms of a rig's People page (app/routes/rig.members.tsx), one per `intent`. */
import { z } from "zod";
import { roleSchema } from "~/auth/roles";
import { emailSchema } from "./account";

export const MEMBERS_INTENT = {
  invite: "invite",
  revoke: "revoke",
  role: "role",
  remove: "remove",
  leave: "leave",
} as const;
export type MembersIntent = (typeof MEMBERS_INTENT)[keyof typeof MEMBERS_INTENT];

export const inviteFormSchema = z.object({ email: emailSchema, role: roleSchema });
export const revokeFormSchema = z.object({ inviteId: z.uuid({ error: "That invitation is no longer pending." }) });
export const roleFormSchema = z.object({ userId: z.uuid({ error: "Choose a member." }), role: roleSchema });
export const removeFormSchema = z.object({ userId: z.uuid({ error: "Choose a member." }) });
