import { notFound } from "~/lib/http";
import type { Route } from "./+types/dev.outbox";
import { getEnv } from "~/env.server";
import { clientAddress, isLoopback } from "~/lib/rate-limit.server";
import { extractSignIn, readOutbox } from "~/mail/outbox.server";

/**
 * GET /dev/outbox — the e-mails the local SMTP fake received, newest first. Only while the app
 * sends to the fake (SMTP_URL unset) and to loopback clients; otherwise it answers 404.
 */
export async function loader({ context }: Route.LoaderArgs) {
  // Only while mail goes to the fake, and only to a client on this machine (the socket's
  // address as the server saw it; a Host or forwarding header proves nothing).
  if (!getEnv().devOutbox || !isLoopback(clientAddress(context))) {
    throw notFound("There is nothing at this address.");
  }
  const messages = await readOutbox(50);
  return {
    messages: messages.map((m) => ({ ...m, ...extractSignIn(m.text) })),
  };
}

export function meta() {
  return [{ title: "Outbox (development) · Tilldawn" }, { name: "robots", content: "noindex" }];
}

const timeFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "medium" });

export default function DevOutbox({ loaderData }: Route.ComponentProps) {
  const { messages } = loaderData;
  return (
    <div className="space-y-4">
      <header className="space-y-1">
        <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Development only</p>
        <h1 className="text-3xl font-bold">Outbox</h1>
        <p className="text-night-200">
          E-mails caught by the local SMTP fake instead of being delivered. Reload to see new ones.
        </p>
      </header>
      {messages.length === 0 ? (
        <p className="rounded-2xl border border-night-700 bg-night-900 p-4 text-night-200">
          No e-mails yet. Ask for a sign-in code and it appears here.
        </p>
      ) : (
        <ol className="space-y-3" aria-label="E-mails, newest first">
          {messages.map((m) => (
            <li key={m.id} className="space-y-2 rounded-2xl border border-night-700 bg-night-900 p-4" data-outbox-message>
              <p className="text-sm text-night-300">
                <time dateTime={m.receivedAt}>{timeFormat.format(new Date(m.receivedAt))}</time> · to{" "}
                <span data-to>{m.to.join(", ")}</span>
              </p>
              <h2 className="text-lg font-bold">{m.subject}</h2>
              {m.code ? (
                <p>
                  Code: <strong className="tabular text-2xl tracking-widest text-dawn-300" data-code>{m.code}</strong>
                </p>
              ) : null}
              {m.links.length ? (
                <ul className="space-y-1">
                  {m.links.map((link) => (
                    <li key={link}>
                      <a href={link} className="inline-flex min-h-12 items-center break-all font-bold text-dawn-400 underline">
                        {link.includes("/invites/") ? "Open the invitation" : link.includes("/auth/verify") ? "Open the sign-in link" : link}
                      </a>
                    </li>
                  ))}
                </ul>
              ) : null}
              <details>
                <summary className="min-h-12 cursor-pointer py-2 text-night-300">Plain text</summary>
                <pre className="whitespace-pre-wrap text-sm text-night-200">{m.text}</pre>
              </details>
            </li>
          ))}
        </ol>
      )}
    </div>
  );
}
