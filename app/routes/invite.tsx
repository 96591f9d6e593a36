import { data, Form, Link, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/invite";
import { protectedAction } from "~/auth/csrf.server";
import { roleHelp, roleLabel } from "~/auth/roles";
import { getUser, requireUser } from "~/auth/session.server";
import { getDb } from "~/db/db.server";
import { acceptInvite, findInvite, inviteProblem, MembershipError } from "~/repos/members.server";
import { notFound } from "~/lib/http";
import { Button, Notice } from "~/components/ui/form";

/**
 * GET /invites/:token — the link from an invitation e-mail. Anyone holding the link sees which
 * rig it is for; accepting needs signing in as the invited address.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const invite = await findInvite(getDb(), params.token);
  if (!invite) throw notFound("This invitation link is not valid. Check that it was copied whole.");
  if (invite.status !== "pending") throw data({ message: inviteProblem[invite.status] }, { status: 410 });
  const user = await getUser(request);
  return {
    rigName: invite.rigName,
    role: invite.role,
    inviterName: invite.inviterName,
    email: invite.email,
    signedInAs: user?.email ?? null,
    rightAccount: user ? user.email.toLowerCase() === invite.email : false,
    signInHref: `/sign-in?${new URLSearchParams({ redirectTo: `/invites/${params.token}`, email: invite.email })}`,
  };
}

export const action = protectedAction(async ({ request, params }: Route.ActionArgs) => {
  const user = await requireUser(request);
  try {
    const accepted = await acceptInvite(getDb(), params.token, user);
    return redirect(`/rigs/${accepted.rigId}`);
  } catch (error) {
    if (error instanceof MembershipError) {
      return data({ error: error.message }, { status: error.code === "wrong_account" ? 403 : 410 });
    }
    throw error;
  }
});

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `Join ${data.rigName} · Tilldawn` : "Invitation · Tilldawn" }];
}

export default function Invite({ loaderData }: Route.ComponentProps) {
  const { rigName, role, inviterName, email, signedInAs, rightAccount, signInHref } = loaderData;
  const answer = useActionData<typeof action>();
  const busy = useNavigation().state === "submitting";
  return (
    <div className="mx-auto max-w-md space-y-6">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Invitation</p>
        <h1 className="text-3xl font-bold">Join “{rigName}”</h1>
        <p className="text-night-200">
          {inviterName ? `${inviterName} invites` : "You are invited"} <strong>{email}</strong> to join as{" "}
          <strong>{roleLabel[role].toLowerCase()}</strong>. {roleHelp[role]}
        </p>
      </header>
      <div aria-live="polite">{answer?.error ? <Notice tone="error">{answer.error}</Notice> : null}</div>
      {!signedInAs ? (
        <Link to={signInHref} className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-5 font-bold text-night-950">
          Sign in as {email} to accept
        </Link>
      ) : rightAccount ? (
        <Form method="post">
          <Button type="submit" disabled={busy}>
            {busy ? "Joining…" : `Join ${rigName}`}
          </Button>
        </Form>
      ) : (
        <div className="space-y-3">
          <Notice tone="error">
            You are signed in as {signedInAs}, but this invitation is for {email}. Sign out, then sign in with that
            address.
          </Notice>
          <Form method="post" action="/sign-out">
            <Button type="submit" variant="quiet">
              Sign out
            </Button>
          </Form>
        </div>
      )}
    </div>
  );
}
