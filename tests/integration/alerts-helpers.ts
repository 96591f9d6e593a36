// Shared set-up for the alert tests: a Juniper rig with an owner and a guest, a browser-like
// push key pair, and decrypting what the push fake received.
import { createECDH, randomBytes, type ECDH } from "node:crypto";
import * as ece from "http_ece";
import { rigMembers } from "~/db/schema";
import type { Db } from "~/db/db.server";
import { createRig } from "~/repos/rigs.server";
import { juniperModel } from "../fixtures/juniper";
import { makeUser, sessionCookieFor } from "./auth";
import type { FakePushRecord } from "../../scripts/fakes";

export async function makeJuniper(db: Db, name = "Juniper") {
  const owner = await makeUser(db, "Ada");
  const guest = await makeUser(db, "Noor");
  const { rig } = await createRig(db, { name, ownerId: owner.id, document: juniperModel });
  await db.insert(rigMembers).values({ rigId: rig.id, userId: guest.id, role: "guest" });
  return { rig, owner, guest, ownerCookie: await sessionCookieFor(db, owner.id), guestCookie: await sessionCookieFor(db, guest.id) };
}

/** What a browser makes for a push subscription: a P-256 key pair and a 16-byte auth secret. */
export function browserKeys(): { ecdh: ECDH; p256dh: string; auth: string } {
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  return { ecdh, p256dh: ecdh.getPublicKey().toString("base64url"), auth: randomBytes(16).toString("base64url") };
}

export async function received(fakeUrl: string, subscriptionId: string): Promise<FakePushRecord[]> {
  const res = await fetch(`${fakeUrl}/messages?subscription=${encodeURIComponent(subscriptionId)}`);
  return (await res.json()) as FakePushRecord[];
}

export function decrypt(record: FakePushRecord, keys: { ecdh: ECDH; auth: string }): unknown {
  const plain = ece.decrypt(Buffer.from(record.bodyBase64, "base64"), { version: "aes128gcm", privateKey: keys.ecdh, authSecret: keys.auth });
  return JSON.parse(plain.toString("utf8"));
}

// 04:00 UTC on 14 October 2026 is 22:00 on the 13th at Juniper's home (America/Denver, MDT).
export const NIGHT_MS = Date.parse("2026-10-14T04:00:00Z");
