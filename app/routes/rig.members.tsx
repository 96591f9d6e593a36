import { useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/rig.members";
import { protectedAction } from "~/auth/csrf.server";
import { requireRigRole } from "~/auth/guards.server";
import { roleHelp, roleLabel, rigRoles, type Role } from "~/auth/roles";
import { getDb } from "~/db/db.server";
import { answerFor, fieldProps, formError } from "~/lib/forms";
import { listMembers, listPendingInvites } from "~/repos/members.server";
import { inviteFormSchema, MEMBERS_INTENT } from "~/schemas/members";
import { OfflineCopy } from "~/components/offline-copy";
import { Button, Card, Field, Notice } from "~/components/ui/form";
import { membersAction, type MembersAnswer } from "./rig.members.server";

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

export const action = protectedAction(membersAction);

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `People on ${data.rig.name} · Tilldawn` : "Tilldawn" }];
}

const dateFormat = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });

export default function Members({ loaderData }: Route.ComponentProps) {
  const { rig, role, me, members, invites } = loaderData;
  const answer = useActionData<MembersAnswer>();
  const navigation = useNavigation();
  const busyIntent = navigation.state === "submitting" ? String(navigation.formData?.get("intent") ?? "") : "";
  const isOwner = role === "owner";
  const [inviteForm, invite] = useForm({
    id: MEMBERS_INTENT.invite,
    lastResult: answerFor(answer, MEMBERS_INTENT.invite),
    defaultValue: { role: "crew" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: inviteFormSchema }),
    shouldValidate: "onSubmit",
  });
  const pageError = formError(answer?.result);
  const inviteRole = invite.role.initialValue ?? "crew";

  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">{rig.name}</p>
        <h1 className="text-3xl font-bold">People on this rig</h1>
        {/* Warn me, the alert log and device tokens live on the rig's Alerts page. */}
        <a href={`/rigs/${rig.id}/alerts`} className="inline-flex min-h-11 items-center font-bold text-dawn-300 underline underline-offset-4">
          Alerts: warn me before the cutoff
        </a>
      <OfflineCopy pageKey={`members:${rig.id}`} data={loaderData} copy={"offlineCopy" in loaderData ? loaderData.offlineCopy : null} what="Invitations and role changes" />
      </header>

      <div aria-live="polite" className="space-y-2">
        {answer?.ok ? <Notice tone="done">{answer.ok}</Notice> : null}
        {pageError ? <Notice tone="error">{pageError}</Notice> : null}
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
                  <input type="hidden" name="intent" value={MEMBERS_INTENT.role} />
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
                  <input type="hidden" name="intent" value={MEMBERS_INTENT.remove} />
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
            <Form method="post" id={inviteForm.id} onSubmit={inviteForm.onSubmit} className="space-y-4" noValidate>
              <input type="hidden" name="intent" value={MEMBERS_INTENT.invite} />
              <Field
                label="Their e-mail address"
                key={invite.email.key}
                {...fieldProps(invite.email)}
                type="email"
                inputMode="email"
                autoComplete="off"
                required
              />
              <fieldset className="space-y-2" aria-describedby={invite.role.errors ? "invite-role-error" : undefined} key={invite.role.key}>
                <legend className="font-bold">Role</legend>
                {(["crew", "guest", "owner"] as Role[]).map((r) => (
                  <label key={r} className="flex min-h-12 items-start gap-3 rounded-xl border border-night-700 p-3">
                    <input
                      type="radio"
                      name={invite.role.name}
                      value={r}
                      defaultChecked={inviteRole === r}
                      className="mt-1 size-5"
                    />
                    <span>
                      <span className="block font-bold">{roleLabel[r]}</span>
                      <span className="block text-sm text-night-300">{roleHelp[r]}</span>
                    </span>
                  </label>
                ))}
                {invite.role.errors ? (
                  <p id="invite-role-error" className="text-sm font-bold text-ember-300">
                    {invite.role.errors[0]}
                  </p>
                ) : null}
              </fieldset>
              <Button type="submit" disabled={busyIntent === MEMBERS_INTENT.invite}>
                {busyIntent === MEMBERS_INTENT.invite ? "Sending…" : "Send invitation"}
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
                      <input type="hidden" name="intent" value={MEMBERS_INTENT.revoke} />
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
          <input type="hidden" name="intent" value={MEMBERS_INTENT.leave} />
          <Button type="submit" variant="danger">
            Leave {rig.name}
          </Button>
        </Form>
      </Card>
    </div>
  );
}
