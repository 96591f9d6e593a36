// A copy of Juniper with its own owner, crew, guest and a stranger, each signed in, and the
// plumbing to call a rig route's loader or action as they would: shared by the route tests that
// call the Now-screen APIs directly (state, modes, compare, SoC per bank).
import type { Db } from "~/db/db.server";
import { rigMembers, users } from "~/db/schema";
import { createSession } from "~/auth/session.server";
import { createRig } from "~/repos/rigs.server";
import { juniperModel } from "../fixtures/juniper";
import { demoPeopleTagged } from "../fixtures/demo";

export const origin = "http://127.0.0.1:3000";

export async function juniperWithPeople(db: Db) {
  const tag = crypto.randomUUID().slice(0, 8);
  const people = await db
    .insert(users)
    .values([...demoPeopleTagged(tag).map(({ email, name }) => ({ email, name })), { email: `stranger-${tag}@elsewhere.example`, name: "Stranger" }])
    .returning();
  const [ada, sam, noor, stranger] = people as [(typeof people)[number], (typeof people)[number], (typeof people)[number], (typeof people)[number]];
  const { rig } = await createRig(db, { name: `Juniper ${tag}`, ownerId: ada.id, document: juniperModel });
  await db.insert(rigMembers).values([
    { rigId: rig.id, userId: sam.id, role: "crew" },
    { rigId: rig.id, userId: noor.id, role: "guest" },
  ]);
  const cookie = async (userId: string) => (await createSession(db, userId)).setCookie.split(";")[0]!;
  return {
    rig,
    ada: { ...ada, cookie: await cookie(ada.id) },
    sam: { ...sam, cookie: await cookie(sam.id) },
    noor: { ...noor, cookie: await cookie(noor.id) },
    stranger: { ...stranger, cookie: await cookie(stranger.id) },
  };
}

export type Call = { cookie?: string; body?: unknown; raw?: string; headers?: Record<string, string> };

/** A request as the app's own pages send it (same origin, JSON body for writes). */
export function request(path: string, method: string, call: Call = {}) {
  const headers: Record<string, string> = { ...(call.cookie ? { cookie: call.cookie } : {}), ...call.headers };
  if (method !== "GET") {
    headers.origin ??= origin;
    headers["sec-fetch-site"] ??= "same-origin";
    headers["content-type"] ??= "application/json";
  }
  return new Request(`${origin}${path}`, {
    method,
    headers,
    ...(method !== "GET" ? { body: call.raw ?? JSON.stringify(call.body ?? {}) } : {}),
  });
}

/** Runs a loader or action, turning a thrown Response into the answer. */
export async function run(fn: (args: never) => Promise<unknown> | unknown, req: Request, rigId: string): Promise<Response> {
  try {
    return (await fn({ request: req, params: { rigId }, context: {} } as never)) as Response;
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}
