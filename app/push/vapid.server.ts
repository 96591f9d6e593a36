/**
 * The VAPID key pair that signs our pushes. In production give VAPID_PUBLIC_KEY,
 * VAPID_PRIVATE_KEY (base64url, from `npx web-push generate-vapid-keys`) and VAPID_SUBJECT
 * (a mailto: or https: contact). Otherwise the keys are created on first start and kept in
 * VAPID_KEYS_FILE (default .data/vapid.json, git-ignored), so subscriptions survive restarts.
 * Every app server and worker must use the same pair.
 */
import { mkdirSync, readFileSync, writeFileSync, renameSync } from "node:fs";
import path from "node:path";
import webpush from "web-push";

export type VapidKeys = { publicKey: string; privateKey: string; subject: string };

let cached: VapidKeys | null = null;

export function loadVapidKeys(env: NodeJS.ProcessEnv = process.env): VapidKeys {
  if (cached) return cached;
  const subject = env.VAPID_SUBJECT ?? "mailto:alerts@tilldawn.invalid";
  if (env.VAPID_PUBLIC_KEY || env.VAPID_PRIVATE_KEY) {
    if (!env.VAPID_PUBLIC_KEY || !env.VAPID_PRIVATE_KEY) throw new Error("Set both VAPID_PUBLIC_KEY and VAPID_PRIVATE_KEY, or neither");
    cached = { publicKey: env.VAPID_PUBLIC_KEY, privateKey: env.VAPID_PRIVATE_KEY, subject };
    return cached;
  }
  const file = path.resolve(env.VAPID_KEYS_FILE ?? ".data/vapid.json");
  try {
    const stored = JSON.parse(readFileSync(file, "utf8")) as { publicKey: string; privateKey: string };
    cached = { ...stored, subject };
  } catch {
    const keys = webpush.generateVAPIDKeys();
    mkdirSync(path.dirname(file), { recursive: true });
    // Written under a unique name then renamed: two processes starting at once end up with one file.
    const tmp = `${file}.${process.pid}.${Date.now()}.tmp`;
    writeFileSync(tmp, JSON.stringify(keys), { mode: 0o600 });
    try {
      // Keep a pair another process wrote first.
      readFileSync(file, "utf8");
    } catch {
      renameSync(tmp, file);
    }
    const stored = JSON.parse(readFileSync(file, "utf8")) as { publicKey: string; privateKey: string };
    cached = { ...stored, subject };
  }
  return cached;
}

/** Tests: forget the cached pair. */
export function resetVapidKeys() {
  cached = null;
}
