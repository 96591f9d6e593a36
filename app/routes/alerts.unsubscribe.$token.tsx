import { data, Form } from "react-router";
import type { Route } from "./+types/alerts.unsubscribe.$token";
import { Button, Card } from "~/components/ui/form";
import { getDb } from "~/db/db.server";
import { findByUnsubscribeToken, unsubscribeEmailByToken } from "~/repos/alerts.server";

const NOT_VALID = "This unsubscribe link is not valid (any more).";

/** A token as we make them (24 random bytes, base64url); anything else is not worth a query. */
function tokenOf(params: { token?: string }): string {
  const token = String(params.token ?? "");
  if (!/^[A-Za-z0-9_-]{32}$/.test(token)) throw data({ message: NOT_VALID }, { status: 404 });
  return token;
}

/** GET /alerts/unsubscribe/:token — the link in every alert e-mail: a button that stops them. */
export async function loader({ params }: Route.LoaderArgs) {
  const row = await findByUnsubscribeToken(getDb(), tokenOf(params));
  if (!row) throw data({ message: "This unsubscribe link is not valid (any more)." }, { status: 404 });
  return { emailOn: row.email };
}

/**
 * POST — one click (RFC 8058: mail programs POST `List-Unsubscribe=One-Click` without cookies
 * or an Origin of ours, so no CSRF check; the unguessable token is the authority, and all it
 * can do is turn e-mail alerts off).
 */
export async function action({ params }: Route.ActionArgs) {
  const done = await unsubscribeEmailByToken(getDb(), tokenOf(params));
  if (!done) throw data({ message: "This unsubscribe link is not valid (any more)." }, { status: 404 });
  return { done: true };
}

export function meta() {
  return [{ title: "Stop alert e-mails · Tilldawn" }, { name: "robots", content: "noindex" }];
}

export default function Unsubscribe({ loaderData, actionData }: Route.ComponentProps) {
  const off = actionData?.done || !loaderData.emailOn;
  return (
    <Card>
      <h1 className="text-2xl font-bold">Alert e-mails</h1>
      {off ? (
        <p role="status">E-mail alerts for this rig are off. Push alerts on your phones, if any, are unchanged.</p>
      ) : (
        <Form method="post">
          <Button type="submit">Stop alert e-mails for this rig</Button>
        </Form>
      )}
    </Card>
  );
}
