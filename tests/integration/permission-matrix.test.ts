/**
 * Every route in app/routes.ts, every method, every kind of person: the answer must match the
 * table in permission-matrix.ts. Route modules are called directly with real Requests against
 * the real database (no server), so the whole matrix runs in a few seconds.
 */
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { rigMembers } from "~/db/schema";
import { createRig } from "~/repos/rigs.server";
import { createInvite } from "~/repos/members.server";
import { starterModel } from "~/repos/starter-model";
import routes from "~/routes";
import { openTestDb } from "./db";
import { callRoute, makeUser, sessionCookieFor, type CallResult } from "./auth";
import { actors, permissionMatrix, type Actor, type MatrixContext, type Outcome } from "./permission-matrix";

const appDir = fileURLToPath(new URL("../../app/", import.meta.url));
const { db, pool } = openTestDb();
afterAll(() => pool.end());

type Entry = { file: string; path: string };
type RouteNode = { file: string; path?: string; index?: boolean; children?: RouteNode[] };

function flatten(nodes: RouteNode[], parent = ""): Entry[] {
  return nodes.flatMap((node) => {
    const full = [parent, node.path ?? ""].filter(Boolean).join("/");
    return [{ file: node.file, path: `/${full}` }, ...flatten(node.children ?? [], full)];
  });
}

const entries = flatten(routes as RouteNode[]);
let ctx: MatrixContext;
const userIds = {} as Record<Exclude<Actor, "anonymous">, string>;

beforeAll(async () => {
  const owner = await makeUser(db, "Ada");
  const crew = await makeUser(db, "Sam");
  const guest = await makeUser(db, "Noor");
  const stranger = await makeUser(db, "Stranger");
  const invitee = await makeUser(db, "Invitee");
  Object.assign(userIds, { owner: owner.id, crew: crew.id, guest: guest.id, stranger: stranger.id });
  const { rig } = await createRig(db, { name: "Matrix van", ownerId: owner.id, document: starterModel({ name: "Matrix van" }) });
  await db.insert(rigMembers).values([
    { rigId: rig.id, userId: crew.id, role: "crew" },
    { rigId: rig.id, userId: guest.id, role: "guest" },
  ]);
  const { token } = await createInvite(db, { rigId: rig.id, email: invitee.email, role: "guest", invitedBy: owner.id });
  ctx = { rigId: rig.id, inviteToken: token };
});

function fillPath(pattern: string): string {
  return pattern.replace(/:(\w+)/g, (_, name: string) => {
    if (name === "rigId") return ctx.rigId;
    if (name === "token") return ctx.inviteToken;
    if (name.endsWith("Id")) return crypto.randomUUID();
    throw new Error(`The permission matrix does not know how to fill :${name}; add it to fillPath.`);
  }).replace("/*", "/no/such/page");
}

function paramsOf(pattern: string, url: string): Record<string, string> {
  const names = [...pattern.matchAll(/:(\w+)/g)].map((m) => m[1]!);
  const keys = pattern.split("/");
  const parts = url.split("/");
  const params: Record<string, string> = {};
  keys.forEach((k, i) => {
    if (k.startsWith(":") && names.includes(k.slice(1))) params[k.slice(1)] = parts[i]!;
  });
  if (pattern.endsWith("*")) params["*"] = "no/such/page";
  return params;
}

function classify(result: CallResult, apiRoute: boolean): Outcome | `status ${number}` {
  const { status, location } = result;
  if (status === 401 && apiRoute) return "signin";
  if (status >= 300 && status < 400) return location?.startsWith("/sign-in") ? "signin" : "ok";
  if (status === 403) return "forbidden";
  if (status === 404) return "notFound";
  if (status === 405) return "notAllowed";
  if (status < 300 || [400, 409, 410, 415, 429].includes(status)) return "ok";
  return `status ${status}`;
}

async function cookieOf(actor: Actor): Promise<string | null> {
  return actor === "anonymous" ? null : sessionCookieFor(db, userIds[actor]);
}

describe("The permission matrix", () => {
  test("lists every route in app/routes.ts, with a row for each method the module answers", async () => {
    const files = entries.map((e) => e.file);
    expect(Object.keys(permissionMatrix).filter((f) => !files.includes(f)), "rows for routes that no longer exist").toEqual([]);
    for (const entry of entries) {
      const row = permissionMatrix[entry.file];
      expect(row, `${entry.file} (${entry.path}) has no row in tests/integration/permission-matrix.ts`).toBeDefined();
      const mod = (await import(path.join(appDir, entry.file))) as { loader?: unknown; action?: unknown };
      expect(Boolean(row!.GET), `${entry.file}: GET row ⇔ loader`).toBe(typeof mod.loader === "function");
      expect(Boolean(row!.POST), `${entry.file}: POST row ⇔ action`).toBe(typeof mod.action === "function");
    }
  });

  for (const entry of entries) {
    const row = permissionMatrix[entry.file];
    if (!row) continue;
    for (const method of ["GET", "POST"] as const) {
      const spec = row[method];
      if (!spec) continue;
      test(`${method} ${entry.path} answers each person as the table says`, async () => {
        const mod = (await import(path.join(appDir, entry.file))) as Record<string, unknown>;
        const fn = method === "GET" ? mod.loader : mod.action;
        const url = fillPath(entry.path);
        const apiRoute = url.startsWith("/api/");
        const got: Record<string, string> = {};
        const want: Record<string, string> = {};
        for (const actor of actors) {
          want[actor] = typeof spec.expect === "string" ? spec.expect : spec.expect[actor];
          const result = await callRoute(fn, {
            path: url,
            method,
            cookie: await cookieOf(actor),
            params: paramsOf(entry.path, url),
            context: { clientAddress: "127.0.0.1" },
            form: method === "POST" && !spec.json ? (spec.form?.(ctx) ?? {}) : undefined,
            json: method === "POST" && spec.json ? spec.json(ctx) : undefined,
          });
          got[actor] = classify(result, apiRoute);
        }
        expect(got).toEqual(want);
      });
      if (method === "POST" && spec.csrf !== false) {
        test(`POST ${entry.path} from another site is refused with 403, even for the owner`, async () => {
          const mod = (await import(path.join(appDir, entry.file))) as Record<string, unknown>;
          const url = fillPath(entry.path);
          for (const origin of ["https://evil.example", null]) {
            const result = await callRoute(mod.action, {
              path: url,
              method: "POST",
              origin,
              cookie: await cookieOf("owner"),
              params: paramsOf(entry.path, url),
              form: spec.json ? undefined : (spec.form?.(ctx) ?? {}),
              json: spec.json?.(ctx),
            });
            expect(result.status, `origin ${origin}`).toBe(403);
          }
        });
      }
    }
  }

  test("a rig id that is not a uuid, or names no rig, is 404 even for a signed-in person", async () => {
    const mod = await import("~/routes/rig");
    const cookie = await cookieOf("owner");
    for (const rigId of ["nope", crypto.randomUUID()]) {
      const result = await callRoute(mod.loader, { path: `/rigs/${rigId}`, cookie, params: { rigId } });
      expect(result.status).toBe(404);
    }
  });
});
