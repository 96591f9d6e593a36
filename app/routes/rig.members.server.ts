/**
 * The People page's action (app/routes/rig.members.tsx): invite, withdraw an invitation, change a
 * role, remove a member, leave. Each form is parsed with its schema from app/schemas/members.ts
 * and answered with Conform's `submission.reply()`.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect } from "react-router";
import type { Route } from "./+types/rig.members";
import { requireRigRole } from "~/auth/guards.server";
import { roleLabel } from "~/auth/roles";
import { getDb } from "~/db/db.server";
import { appOrigin } from "~/env.server";
import { readIntent, type FormAnswer } from "~/lib/forms";
import { MailError, sendMail } from "~/mail/mailer.server";
import { inviteMail } from "~/mail/templates";
import { changeRole, createInvite, MembershipError, removeMember, revokeInvite } from "~/repos/members.server";
import { inviteFormSchema, MEMBERS_INTENT, removeFormSchema, revokeFormSchema, roleFormSchema, type MembersIntent } from "~/schemas/members";
import { readForm } from "~/lib/http";

export type MembersAnswer = FormAnswer<MembersIntent>;

const answer = (status: number, body: MembersAnswer) => data<MembersAnswer>(body, { status });

export async function membersAction({ request, params }: Route.ActionArgs) {
  const form = await readForm(request);
  const intent = readIntent(form, MEMBERS_INTENT);
  // Leaving is for every member; everything else here is for owners.
  const { user, rig } = await requireRigRole(request, params.rigId, intent === MEMBERS_INTENT.leave ? "guest" : "owner");
  const db = getDb();
  switch (intent) {
    case MEMBERS_INTENT.invite: {
      const submission = parseWithZod(form, { schema: inviteFormSchema });
      if (submission.status !== "success") return answer(400, { intent, result: submission.reply() });
      const created = await byTheRules(() =>
        createInvite(db, { rigId: rig.id, email: submission.value.email, role: submission.value.role, invitedBy: user.id }),
      );
      if (!created.ok) return answer(created.status, { intent, result: submission.reply({ formErrors: [created.message] }) });
      const { invite, token } = created.value;
      const role = roleLabel[invite.role].toLowerCase();
      try {
        await sendMail(
          inviteMail({
            to: invite.email,
            rigName: rig.name,
            inviterName: user.name || user.email,
            role,
            link: `${appOrigin(request)}/invites/${token}`,
            expiresAt: invite.expiresAt,
          }),
        );
      } catch (error) {
        if (!(error instanceof MailError)) throw error;
        await revokeInvite(db, rig.id, invite.id);
        return answer(503, { intent, result: submission.reply({ formErrors: ["The invitation e-mail could not be sent. Try again in a moment."] }) });
      }
      return answer(200, { intent, result: submission.reply({ resetForm: true }), ok: `Invitation sent to ${invite.email} as ${role}.` });
    }
    case MEMBERS_INTENT.revoke: {
      const submission = parseWithZod(form, { schema: revokeFormSchema });
      if (submission.status !== "success" || !(await revokeInvite(db, rig.id, submission.value.inviteId))) {
        return answer(404, { intent, result: submission.reply({ formErrors: ["That invitation is no longer pending."] }) });
      }
      return answer(200, { intent, result: submission.reply(), ok: "Invitation withdrawn. Its link no longer works." });
    }
    case MEMBERS_INTENT.role: {
      const submission = parseWithZod(form, { schema: roleFormSchema });
      if (submission.status !== "success") return answer(400, { intent, result: submission.reply({ formErrors: ["Choose a member and a role."] }) });
      if (submission.value.userId === user.id) {
        return answer(400, { intent, result: submission.reply({ formErrors: ["You cannot change your own role: another owner can change it for you."] }) });
      }
      const refused = await byTheRules(() => changeRole(db, rig.id, submission.value.userId, submission.value.role));
      if (!refused.ok) return answer(refused.status, { intent, result: submission.reply({ formErrors: [refused.message] }) });
      return answer(200, { intent, result: submission.reply(), ok: `Role changed to ${roleLabel[submission.value.role].toLowerCase()}.` });
    }
    case MEMBERS_INTENT.remove: {
      const submission = parseWithZod(form, { schema: removeFormSchema });
      if (submission.status !== "success") return answer(400, { intent, result: submission.reply({ formErrors: ["Choose a member."] }) });
      const refused = await byTheRules(() => removeMember(db, rig.id, submission.value.userId));
      if (!refused.ok) return answer(refused.status, { intent, result: submission.reply({ formErrors: [refused.message] }) });
      if (submission.value.userId === user.id) return redirect("/rigs");
      return answer(200, { intent, result: submission.reply(), ok: "Removed from the rig." });
    }
    case MEMBERS_INTENT.leave: {
      const refused = await byTheRules(() => removeMember(db, rig.id, user.id));
      if (!refused.ok) return answer(refused.status, { intent, result: { status: "error", error: { "": [refused.message] } } });
      return redirect("/rigs");
    }
    default:
      return data({ error: { code: "unknown_intent", message: "Unknown request." } }, { status: 400 });
  }
}

/** Runs a membership change; a refusal by the rules (last owner, already a member…) becomes a 4xx. */
async function byTheRules<T>(change: () => Promise<T>): Promise<{ ok: true; value: T } | { ok: false; status: number; message: string }> {
  try {
    return { ok: true, value: await change() };
  } catch (error) {
    if (!(error instanceof MembershipError)) throw error;
    return { ok: false, status: error.code === "not_member" ? 404 : 400, message: error.message };
  }
}
