/** The text of every e-mail Tilldawn sends: a plain-text part and a matching HTML part. */
import type { Mail } from "./mailer.server";

const escape = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

function htmlPage(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escape(title)}</title></head>
<body style="margin:0;padding:24px;background:#0a1030;color:#e6ebfb;font-family:Atkinson Hyperlegible,Arial,sans-serif;font-size:17px;line-height:1.5">
<div style="max-width:520px;margin:0 auto">
<p style="color:#f8b54a;font-weight:bold;letter-spacing:2px;text-transform:uppercase;font-size:13px">Tilldawn</p>
${body}
</div></body></html>`;
}

const button = (href: string, label: string) =>
  `<p><a href="${escape(href)}" style="display:inline-block;padding:14px 22px;border-radius:12px;background:#f59e1c;color:#05081a;font-weight:bold;text-decoration:none">${escape(label)}</a></p>`;

export function signInCodeMail(input: { to: string; code: string; magicLink: string; validMinutes: number }): Mail {
  const { to, code, magicLink, validMinutes } = input;
  return {
    to,
    subject: `Your Tilldawn sign-in code: ${code}`,
    text: [
      `Your sign-in code is ${code}`,
      "",
      `Type it on the sign-in page, or open this link in the same browser:`,
      magicLink,
      "",
      `The code works once and for ${validMinutes} minutes.`,
      "If you did not ask to sign in, ignore this e-mail: nothing happens without the code.",
    ].join("\n"),
    html: htmlPage(
      "Your sign-in code",
      `<h1 style="font-size:24px">Your sign-in code</h1>
<p style="font-size:34px;font-weight:bold;letter-spacing:6px;font-variant-numeric:tabular-nums" data-code>${escape(code)}</p>
<p>Type it on the sign-in page, or open this link in the same browser:</p>
${button(magicLink, "Sign in to Tilldawn")}
<p style="color:#a3b2e3">The code works once and for ${validMinutes} minutes. If you did not ask to sign in, ignore this e-mail: nothing happens without the code.</p>`,
    ),
  };
}

export function inviteMail(input: { to: string; rigName: string; inviterName: string; role: string; link: string; expiresAt: Date }): Mail {
  const { to, rigName, inviterName, role, link, expiresAt } = input;
  const until = expiresAt.toUTCString().replace(/:\d\d GMT$/, " UTC");
  return {
    to,
    subject: `${inviterName} invites you to the rig "${rigName}" on Tilldawn`,
    text: [
      `${inviterName} invites you to join the rig "${rigName}" as ${role}.`,
      "",
      "Accept the invitation here (sign in with this e-mail address):",
      link,
      "",
      `The link works once, until ${until}.`,
    ].join("\n"),
    html: htmlPage(
      `Join ${rigName}`,
      `<h1 style="font-size:24px">Join the rig “${escape(rigName)}”</h1>
<p>${escape(inviterName)} invites you to join as <strong>${escape(role)}</strong>.</p>
${button(link, "Accept the invitation")}
<p style="color:#a3b2e3">Sign in with this e-mail address to accept. The link works once, until ${escape(until)}.</p>`,
    ),
  };
}
