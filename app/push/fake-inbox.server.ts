/**
 * Reading what the local fake push service (scripts/fakes.ts, `startPushFake`) stored: one
 * JSON file per push in DEV_PUSH_DIR (default .data/push).
 */
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";

export type FakePush = {
  id: string;
  subscriptionId: string;
  receivedAt: string;
  encoding: string;
  ttl: string | null;
  urgency: string | null;
  authorization: string | null;
  bytes: number;
  bodyBase64: string;
  /** The plaintext, when the fake made the subscription itself and so holds its keys. */
  decrypted: string | null;
};

export async function readFakePushes(limit = 50, dir = process.env.DEV_PUSH_DIR ?? ".data/push"): Promise<FakePush[]> {
  const folder = path.resolve(dir, "messages");
  let names: string[];
  try {
    names = (await readdir(folder)).filter((n) => n.endsWith(".json"));
  } catch {
    return [];
  }
  names.sort().reverse();
  const out: FakePush[] = [];
  for (const name of names.slice(0, limit)) {
    try {
      out.push(JSON.parse(await readFile(path.join(folder, name), "utf8")) as FakePush);
    } catch {
      // a file being written
    }
  }
  return out;
}
