import { data } from "react-router";
import type { Route } from "./+types/dev.push";
import { getEnv } from "~/env.server";
import { readFakePushes } from "~/push/fake-inbox.server";

/**
 * GET /dev/push — what the local fake push service received, newest first, decrypted where
 * the fake holds the subscription's keys (subscriptions it made itself). Off (404) in production.
 */
export async function loader() {
  if (!getEnv().local) throw data({ message: "There is nothing at this address." }, { status: 404 });
  return { pushes: await readFakePushes(50) };
}

export function meta() {
  return [{ title: "Push messages (development) · Tilldawn" }, { name: "robots", content: "noindex" }];
}

const timeFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "medium" });

export default function DevPush({ loaderData }: Route.ComponentProps) {
  const { pushes } = loaderData;
  return (
    <div className="space-y-4">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Development only</p>
        <h1 className="text-3xl font-bold">Push messages</h1>
        <p className="text-night-200">Pushes the local fake push service received instead of a real one. Reload to see new ones.</p>
      </header>
      {pushes.length === 0 ? (
        <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">No pushes yet.</p>
      ) : (
        <ol className="space-y-3" aria-label="Pushes, newest first">
          {pushes.map((p) => (
            <li key={p.id} className="rounded-2xl border border-night-700 bg-night-900 p-4" data-push-id={p.id}>
              <p className="text-sm text-night-300">
                {timeFormat.format(new Date(p.receivedAt))} · subscription {p.subscriptionId} · {p.bytes} bytes, {p.encoding}
              </p>
              {p.decrypted ? <pre className="mt-2 whitespace-pre-wrap break-words text-night-100">{p.decrypted}</pre> : <p className="mt-2 text-night-300">Encrypted for a browser whose keys the fake does not hold.</p>}
            </li>
          ))}
        </ol>
      )}
    </div>
  );
}
