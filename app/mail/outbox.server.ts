/** Reads the local SMTP fake's stored messages (scripts/fakes.ts) for the /dev/outbox page. */
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { getEnv } from "~/env.server";

export type OutboxEntry = {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
};

/** Newest first; at most `limit` messages. */
export async function readOutbox(limit = 50, dir = getEnv().DEV_OUTBOX_DIR): Promise<OutboxEntry[]> {
  const folder = path.resolve(dir);
  let names: string[];
  try {
    names = (await readdir(folder)).filter((n) => n.endsWith(".json"));
  } catch {
    return [];
  }
  names.sort((a, b) => parseInt(b, 10) - parseInt(a, 10) || b.localeCompare(a));
  const entries = await Promise.all(
    names.slice(0, limit).map(async (name) => {
      try {
        return JSON.parse(await readFile(path.join(folder, name), "utf8")) as OutboxEntry;
      } catch {
        return null;
      }
    }),
  );
  return entries.filter((e): e is OutboxEntry => e !== null);
}

/** The sign-in code and the links in a message, for quick use on the outbox page. */
export function extractSignIn(text: string): { code: string | null; links: string[] } {
  const code = /sign-in code is (\d{6})/i.exec(text)?.[1] ?? null;
  const links = [...text.matchAll(/https?:\/\/\S+/g)].map((m) => m[0]);
  return { code, links };
}
