/**
 * The e-mail form of an alert: plain text and HTML, with a one-click unsubscribe link in the
 * body and in the List-Unsubscribe / List-Unsubscribe-Post headers (RFC 2369, RFC 8058).
 */
import type { Mail } from "~/mail/mailer.server";

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

export function alertEmail(input: { to: string; title: string; body: string; url: string; unsubscribeUrl: string }): Mail {
  const text = `${input.body}\n\nStop these e-mails for this rig (one click): ${input.unsubscribeUrl}\n`;
  const bodyNoLink = input.body.replace(/ Open Now: \S+$/, "");
  const html = `<p>${esc(bodyNoLink)}</p><p><a href="${esc(input.url)}">Open Now</a></p><p style="color:#666;font-size:small"><a href="${esc(input.unsubscribeUrl)}">Stop these e-mails for this rig</a></p>`;
  return {
    to: input.to,
    subject: input.title,
    text,
    html,
    headers: { "List-Unsubscribe": `<${input.unsubscribeUrl}>`, "List-Unsubscribe-Post": "List-Unsubscribe=One-Click" },
  };
}
