/**
 * Outgoing e-mail through nodemailer over SMTP: SMTP_URL in production, the local SMTP fake on
 * 127.0.0.1:SMTP_PORT otherwise (scripts/fakes.ts keeps what it receives for /dev/outbox).
 * Every message has a plain-text and an HTML part.
 */
import nodemailer, { type Transporter } from "nodemailer";
import { getEnv } from "~/env.server";

export type Mail = { to: string; subject: string; text: string; html: string; headers?: Record<string, string> };
export type MailSender = (mail: Mail) => Promise<void>;

let transporter: Transporter | undefined;
let override: MailSender | null = null;

function transport(): Transporter {
  if (!transporter) {
    const env = getEnv();
    transporter = env.SMTP_URL
      ? nodemailer.createTransport(env.SMTP_URL)
      : nodemailer.createTransport({
          host: "127.0.0.1",
          port: env.SMTP_PORT,
          secure: false,
          ignoreTLS: true,
          connectionTimeout: 5000,
          greetingTimeout: 5000,
        });
  }
  return transporter;
}

/** Tests may capture mail instead of sending it; pass null to restore SMTP. */
export function setMailSender(sender: MailSender | null): void {
  override = sender;
}

export class MailError extends Error {
  override name = "MailError";
}

export async function sendMail(mail: Mail): Promise<void> {
  if (override) return override(mail);
  try {
    await transport().sendMail({ from: getEnv().MAIL_FROM, ...mail });
  } catch (error) {
    console.error(`[mail] could not send "${mail.subject}": ${(error as Error).message}`);
    throw new MailError("The e-mail could not be sent.");
  }
}
