import { data, Form, redirect, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/members";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { roleHelp, roleLabel, rigRoles, type Role } from "~/auth/roles";
import { emailSchema } from "~/auth/sign-in.server";
import { getDb } from "~/db/db.server";
import { appOrigin } from "~/env.server";
import { isUuid } from "~/lib/ids";
import { MailError, sendMail } from "~/mail/mailer.server";
import { inviteMail } from "~/mail/templates";
import {
  changeRole,
  createInvite,
  listMembers,
  listPendingInvites,
  MembershipError,
  removeMember,
  revokeInvite,
} from "~/repos/members.server";
import { OfflineCopy } from "~/components/offline-copy";
import { Button, Card, Field, Notice } from "~/components/ui/form";

/** GET /rigs/:rigId/members — everyone on the rig sees who is on it; owners also manage it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, role, rig } = await requireRigRole(request, params.rigId, "guest");
  const db = getDb();
  const [members, invites] = await Promise.all([
    listMembers(db, rig.id),
    role === "owner" ? listPendingInvites(db, rig.id) : Promise.resolve([]),
  ]);
  return { rig, role, me: user.id, members, invites };
}

/** Offline: the copy this phone kept the last time the page was shown online. */
export async function clientLoader({ serverLoader, params }: Route.ClientLoaderArgs) {
  const { serverOrPhoneCopy } = await import("~/offline/offline-loader.client");
  return serverOrPhoneCopy(`members:${params.rigId}`, serverLoader);
}

type ActionAnswer = {
  intent: string;
  ok?: string;
  error?: string;
  fieldErrors?: { email?: string; role?: string };
  values?: { email: string; role: string };
};

const roleSchema = z.enum(rigRoles, { error: "Choose owner, crew or guest." });

export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  const form = await request.formData();
  const intent = String(form.get("intent") ?? "");
  // Leaving is for every member; everything else here is for owners.
  const { user, rig } = await requireRigRole(request, params.rigId, intent === "leave" ? "guest" : "owner");
  const db = getDb();
  const fail = (status: number, answer: Omit<ActionAnswer, "intent">) => data<ActionAnswer>({ intent, ...answer }, { status });
  try {
    switch (intent) {
      case "invite": {
        const values = { email: String(form.get("email") ?? ""), role: String(form.get("role") ?? "") };
        const email = emailSchema.safeParse(values.email);
        const role = roleSchema.safeParse(values.role);
        if (!email.success || !role.success) {
          return fail(400, {
            values,
            fieldErrors: { email: email.error?.issues[0]?.message, role: role.error?.issues[0]?.message },
          });
        }
        const { invite, token } = await createInvite(db, { rigId: rig.id, email: email.data, role: role.data, invitedBy: user.id });
        try {
          await sendMail(
            inviteMail({
              to: invite.email,
              rigName: rig.name,
              inviterName: user.name || user.email,
              role: roleLabel[invite.role].toLowerCase(),
              link: `${appOrigin(request)}/invites/${token}`,
              expiresAt: invite.expiresAt,
            }),
          );
        } catch (error) {
          if (!(error instanceof MailError)) throw error;
          await revokeInvite(db, rig.id, invite.id);
          return fail(503, { values, error: "The invitation e-mail could not be sent. Try again in a moment." });
        }
        return data<ActionAnswer>({ intent, ok: `Invitation sent to ${invite.email} as ${roleLabel[invite.role].toLowerCase()}.` });
      }
      case "revoke": {
        const inviteId = String(form.get("inviteId") ?? "");
        if (!isUuid(inviteId) || !(await revokeInvite(db, rig.id, inviteId))) {
          return fail(404, { error: "That invitation is no longer pending." });
        }
        return data<ActionAnswer>({ intent, ok: "Invitation withdrawn. Its link no longer works." });
      }
      case "role": {
        const userId = String(form.get("userId") ?? "");
        const role = roleSchema.safeParse(form.get("role"));
        if (!isUuid(userId) || !role.success) return fail(400, { error: "Choose a member and a role." });
        if (userId === user.id) return fail(400, { error: "You cannot change your own role: another owner can change it for you." });
        await changeRole(db, rig.id, userId, role.data);
        return data<ActionAnswer>({ intent, ok: `Role changed to ${roleLabel[role.data].toLowerCase()}.` });
      }
      case "remove": {
        const userId = String(form.get("userId") ?? "");
        if (!isUuid(userId)) return fail(400, { error: "Choose a member." });
        await removeMember(db, rig.id, userId);
        if (userId === user.id) return redirect("/rigs");
        return data<ActionAnswer>({ intent, ok: "Removed from the rig." });
      }
      case "leave": {
        await removeMember(db, rig.id, user.id);
        return redirect("/rigs");
      }
      default:
        return fail(400, { error: "Unknown request." });
    }
  } catch (error) {
    if (error instanceof MembershipError) {
      return fail(error.code === "not_member" ? 404 : 400, {
        error: error.message,
        values: intent === "invite" ? { email: String(form.get("email") ?? ""), role: String(form.get("role") ?? "") } : undefined,
      });
    }
    throw error;
  }
});

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `People on ${data.rig.name} · Tilldawn` : "Tilldawn" }];
}

const dateFormat = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });

export default function Members({ loaderData }: Route.ComponentProps) {
  const { rig, role, me, members, invites } = loaderData;
  const answer = useActionData<ActionAnswer>();
  const navigation = useNavigation();
  const busyIntent = navigation.state === "submitting" ? String(navigation.formData?.get("intent") ?? "") : "";
  const isOwner = role === "owner";
  const inviteAnswer = answer?.intent === "invite" ? answer : undefined;

  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">{rig.name}</p>
        <h1 className="text-3xl font-bold">People on this rig</h1>
      <OfflineCopy pageKey={`members:${rig.id}`} data={loaderData} copy={"offlineCopy" in loaderData ? loaderData.offlineCopy : null} what="Invitations and role changes" />
      </header>

      <div aria-live="polite" className="space-y-2">
        {answer?.ok ? <Notice tone="done">{answer.ok}</Notice> : null}
        {answer?.error ? <Notice tone="error">{answer.error}</Notice> : null}
      </div>

      <ul className="divide-y divide-night-800 rounded-2xl border border-night-700 bg-night-900" aria-label="Members">
        {members.map((m) => (
          <li key={m.userId} className="space-y-3 p-4">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <div>
                <p className="text-lg font-bold">
                  {m.name || m.email}
                  {m.userId === me ? <span className="ml-2 text-sm text-night-300">(you)</span> : null}
                </p>
                <p className="text-sm text-night-300">{m.email}</p>
              </div>
              <span className="rounded-full border border-night-600 px-3 py-1 text-sm font-bold text-night-200">
                {roleLabel[m.role]}
              </span>
            </div>
            {isOwner && m.userId === me ? (
              <p className="text-sm text-night-300">Your own role can be changed by another owner of the rig.</p>
            ) : null}
            {isOwner && m.userId !== me ? (
              <div className="flex flex-wrap items-end gap-2">
                <Form method="post" className="flex items-end gap-2">
                  <input type="hidden" name="intent" value="role" />
                  <input type="hidden" name="userId" value={m.userId} />
                  <label className="space-y-1">
                    <span className="block text-sm font-bold">Role of {m.name || m.email}</span>
                    <select
                      name="role"
                      defaultValue={m.role}
                      className="min-h-12 rounded-xl border border-night-600 bg-night-950 px-3 text-night-100"
                    >
                      {rigRoles.map((r) => (
                        <option key={r} value={r}>
                          {roleLabel[r]}
                        </option>
                      ))}
                    </select>
                  </label>
                  <Button type="submit" variant="quiet">
                    Change role
                  </Button>
                </Form>
                <Form method="post">
                  <input type="hidden" name="intent" value="remove" />
                  <input type="hidden" name="userId" value={m.userId} />
                  <Button type="submit" variant="danger" aria-label={`Remove ${m.name || m.email} from the rig`}>
                    Remove
                  </Button>
                </Form>
              </div>
            ) : null}
          </li>
        ))}
      </ul>

      {isOwner ? (
        <>
          <Card>
            <h2 className="text-xl font-bold">Invite someone</h2>
            <p className="text-night-200">They get an e-mail with a link that works once, for 7 days.</p>
            <Form method="post" className="space-y-4" noValidate>
              <input type="hidden" name="intent" value="invite" />
              <Field
                label="Their e-mail address"
                name="email"
                type="email"
                inputMode="email"
                autoComplete="off"
                required
                defaultValue={inviteAnswer?.values?.email ?? ""}
                key={inviteAnswer?.ok ? "sent" : "editing"}
                error={inviteAnswer?.fieldErrors?.email}
              />
              <fieldset className="space-y-2" aria-describedby={inviteAnswer?.fieldErrors?.role ? "invite-role-error" : undefined}>
                <legend className="font-bold">Role</legend>
                {(["crew", "guest", "owner"] as Role[]).map((r) => (
                  <label key={r} className="flex min-h-12 items-start gap-3 rounded-xl border border-night-700 p-3">
                    <input
                      type="radio"
                      name="role"
                      value={r}
                      defaultChecked={(inviteAnswer?.values?.role ?? "crew") === r}
                      className="mt-1 size-5"
                    />
                    <span>
                      <span className="block font-bold">{roleLabel[r]}</span>
                      <span className="block text-sm text-night-300">{roleHelp[r]}</span>
                    </span>
                  </label>
                ))}
                {inviteAnswer?.fieldErrors?.role ? (
                  <p id="invite-role-error" className="text-sm font-bold text-ember-300">
                    {inviteAnswer.fieldErrors.role}
                  </p>
                ) : null}
              </fieldset>
              <Button type="submit" disabled={busyIntent === "invite"}>
                {busyIntent === "invite" ? "Sending…" : "Send invitation"}
              </Button>
            </Form>
          </Card>

          <Card>
            <h2 className="text-xl font-bold">Pending invitations</h2>
            {invites.length === 0 ? (
              <p className="text-night-300">None.</p>
            ) : (
              <ul className="space-y-2" aria-label="Pending invitations">
                {invites.map((inv) => (
                  <li key={inv.id} className="flex flex-wrap items-center justify-between gap-2 rounded-xl border border-night-700 p-3">
                    <span>
                      <span className="block font-bold">{inv.email}</span>
                      <span className="block text-sm text-night-300">
                        {roleLabel[inv.role]} · until {dateFormat.format(new Date(inv.expiresAt))}
                      </span>
                    </span>
                    <Form method="post">
                      <input type="hidden" name="intent" value="revoke" />
                      <input type="hidden" name="inviteId" value={inv.id} />
                      <Button type="submit" variant="danger" aria-label={`Withdraw the invitation to ${inv.email}`}>
                        Withdraw
                      </Button>
                    </Form>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </>
      ) : null}

      <Card>
        <h2 className="text-xl font-bold">Leave this rig</h2>
        <p className="text-night-200">
          {isOwner
            ? "An owner can leave once someone else is owner too."
            : "You stop seeing this rig. An owner can invite you again."}
        </p>
        <Form method="post">
          <input type="hidden" name="intent" value="leave" />
          <Button type="submit" variant="danger">
            Leave {rig.name}
          </Button>
        </Form>
      </Card>
    </div>
  );
}
