/**
 * Who may use each route: the one table the permission-matrix test checks. EVERY route file in
 * app/routes.ts needs an entry here, with a GET row when the module has a loader and a POST row
 * when it has an action. Add yours when you add a route.
 *
 * Actors: anonymous (signed out), stranger (signed in, not on the rig), guest, crew, owner of
 * the fixture rig. Outcomes:
 *   ok        — passed authorization: 2xx, a redirect that is not to /sign-in, or a 400/409/410/
 *               415/429 about the input (bodies here are chosen to be harmless)
 *   signin    — a redirect to /sign-in (pages) or 401 JSON (/api/)
 *   forbidden — 403 (can see, may not change; or the wrong account for an invitation)
 *   notFound  — 404 (the rig is not revealed)
 *   notAllowed — 405 (method not used by the route)
 * Every POST row with `csrf` (the default) is also sent by the owner from another origin and
 * must answer 403.
 */
import { juniperModel } from "../fixtures/juniper";

export const actors = ["anonymous", "stranger", "guest", "crew", "owner"] as const;
export type Actor = (typeof actors)[number];
export type Outcome = "ok" | "signin" | "forbidden" | "notFound" | "notAllowed";

/** What the test provides: the fixture rig and a pending invitation to someone else. */
export type MatrixContext = { rigId: string; inviteToken: string };
// (Other route parameters, e.g. :readingId, are filled with a fresh uuid.)

export type MethodRow = {
  expect: Outcome | Record<Actor, Outcome>;
  form?: (ctx: MatrixContext) => Record<string, string>;
  json?: (ctx: MatrixContext) => unknown;
  /** false only for public, cookie-less endpoints. */
  csrf?: boolean;
};
export type RouteRow = { GET?: MethodRow; POST?: MethodRow; note?: string };

const clientOnly =
  "Client-only (clientLoader/clientAction over the offline store): the server sends the page shell and no data; what reaches the store is checked by POST /api/sync.";

const members = (): Record<Actor, Outcome> => ({ anonymous: "signin", stranger: "notFound", guest: "ok", crew: "ok", owner: "ok" });
const crewUp = (): Record<Actor, Outcome> => ({ anonymous: "signin", stranger: "notFound", guest: "forbidden", crew: "ok", owner: "ok" });
const ownerOnly = (): Record<Actor, Outcome> => ({ anonymous: "signin", stranger: "notFound", guest: "forbidden", crew: "forbidden", owner: "ok" });
const signedIn = (): Record<Actor, Outcome> => ({ anonymous: "signin", stranger: "ok", guest: "ok", crew: "ok", owner: "ok" });

export const permissionMatrix: Record<string, RouteRow> = {
  "routes/home.tsx": { GET: { expect: "ok" } },
  "routes/sign-in.tsx": {
    GET: { expect: "ok" },
    POST: { expect: "ok", form: () => ({ intent: "send", email: "not an address" }) },
  },
  "routes/auth.verify.tsx": { GET: { expect: "ok" } },
  "routes/sign-out.ts": { GET: { expect: "ok" }, POST: { expect: "ok" } },
  "routes/welcome.tsx": {
    GET: { expect: signedIn() },
    POST: { expect: signedIn(), form: () => ({ name: "" }) },
  },
  "routes/account.tsx": {
    GET: { expect: signedIn() },
    POST: { expect: signedIn(), form: () => ({ intent: "profile", name: "" }) },
  },
  "routes/rigs.tsx": {
    GET: { expect: signedIn() },
    POST: { expect: signedIn(), form: () => ({ name: "" }) },
  },
  "routes/rig.tsx": { GET: { expect: members() } },
  "routes/rig.model.tsx": { GET: { expect: members() } },
  "routes/rig.budget.tsx": { GET: { expect: members() } },
  "routes/rig.log.tsx": { note: clientOnly },
  "routes/rig.log.import.tsx": { note: clientOnly },
  "routes/rig.log.$readingId.tsx": { note: clientOnly },
  "routes/rig.members.tsx": {
    GET: { expect: members() },
    POST: { expect: ownerOnly(), form: () => ({ intent: "invite", email: "not an address", role: "guest" }) },
  },
  "routes/invite.tsx": {
    note: "Anyone holding the link sees the invitation; only the invited address may accept.",
    GET: { expect: "ok" },
    POST: {
      expect: { anonymous: "signin", stranger: "forbidden", guest: "forbidden", crew: "forbidden", owner: "forbidden" },
    },
  },
  "routes/dev.outbox.tsx": { note: "404 when SMTP_URL is set (see sign-in tests).", GET: { expect: "ok" } },
  "routes/api.health.ts": { GET: { expect: "ok" } },
  "routes/api.v1.me.ts": { GET: { expect: signedIn() } },
  "routes/api.v1.projection.ts": {
    note: "Public and stateless: no cookies used, so no CSRF check.",
    GET: { expect: "notAllowed" },
    POST: { expect: "ok", json: () => ({}), csrf: false },
  },
  "routes/api.v1.schema.ts": { GET: { expect: "ok" } },
  "routes/api.sync.ts": {
    GET: { expect: "notAllowed" },
    POST: { expect: members(), json: (ctx) => ({ rigId: ctx.rigId, cursor: null, changes: [] }) },
  },
  "routes/api.rigs.$rigId.readings.ts": { GET: { expect: members() }, POST: { expect: "notAllowed", json: () => ({}), csrf: false } },
  "routes/api.rigs.$rigId.readings.csv.ts": { GET: { expect: members() } },
  "routes/api.rigs.$rigId.model.ts": { GET: { expect: members() } },
  "routes/api.rigs.$rigId.state.ts": { GET: { expect: members() }, POST: { expect: crewUp(), json: () => ({}) } },
  "routes/api.rigs.$rigId.modes.ts": { GET: { expect: "notAllowed" }, POST: { expect: ownerOnly(), json: () => ({}) } },
  "routes/api.rigs.$rigId.compare.ts": { GET: { expect: "notAllowed" }, POST: { expect: members(), json: () => ({}) } },
  // Alerts and devices (issue 13)
  "routes/rig.alerts.tsx": {
    note: "Warn me, own choices and the alert log for every member; rules and device tokens for owners.",
    GET: { expect: members() },
    POST: { expect: ownerOnly(), form: () => ({ intent: "device-create", name: "" }) },
  },
  "routes/alerts.unsubscribe.$token.tsx": {
    note: "The unguessable token is the authority (one-click unsubscribe from a mail program: no cookies, no CSRF check); an unknown token is 404.",
    GET: { expect: "notFound" },
    POST: { expect: "notFound", csrf: false },
  },
  "routes/dev.push.tsx": { note: "404 outside local runs.", GET: { expect: "ok" } },
  "routes/api.rigs.$rigId.push.ts": {
    GET: { expect: members() },
    POST: { expect: members(), json: () => ({ intent: "subscribe" }) },
  },
  "routes/api.v1.rigs.$rigId.readings.ts": {
    note: "Device ingest: a Bearer device token, never cookies (no CSRF check). Without a token every actor gets 401; tokens are tested in devices.test.ts.",
    GET: { expect: "notAllowed" },
    POST: { expect: { anonymous: "signin", stranger: "signin", guest: "signin", crew: "signin", owner: "signin" }, json: () => ({}), csrf: false },
  },
  "routes/api.v1.device-readings-schema.ts": { GET: { expect: "ok" } },
  "routes/rig.photos.tsx": { GET: { expect: members() } },
  "routes/api.rigs.photos.ts": {
    note: "Adding: owners to parts and places, crew and owners to readings (tests/integration/photos.test.ts checks each). The empty JSON body names no target: 400.",
    GET: { expect: members() },
    POST: { expect: crewUp(), json: () => ({}) },
  },
  "routes/api.rigs.photos.$photoId.ts": {
    note: "The :photoId here is a fresh uuid, so members who pass the rig check get 404; photos.test.ts checks real photos for each person.",
    GET: { expect: { anonymous: "signin", stranger: "notFound", guest: "notFound", crew: "notFound", owner: "notFound" } },
    POST: { expect: { anonymous: "signin", stranger: "notFound", guest: "forbidden", crew: "notFound", owner: "notFound" }, form: () => ({ intent: "delete" }) },
  },
  "routes/not-found.tsx": { GET: { expect: "notFound" } },
};

/**
 * Cross-rig ids (issue 9, finding 3): every write, with an id that belongs to ANOTHER rig in
 * each field that names something. The person is the owner of the rig in the URL (and, in a
 * second pass, an owner of the other rig too: the write still must not cross over). Each case
 * must leave the other rig exactly as it was (model branches and revisions, readings, members,
 * invitations, change log). EVERY new write route adds its id fields here.
 */
export type CrossRigContext = {
  /** The rig in the URL / the sync envelope; the actor owns it. */
  rigId: string;
  branchId: string;
  /** Ids that belong to the other rig. */
  other: { rigId: string; branchId: string; readingId: string; inviteId: string; memberUserId: string };
};

export type CrossRigCase = {
  name: string;
  /** The route module (a key of permissionMatrix). */
  file: string;
  path: (ctx: CrossRigContext) => string;
  params: (ctx: CrossRigContext) => Record<string, string>;
  form?: (ctx: CrossRigContext) => Record<string, string>;
  json?: (ctx: CrossRigContext) => unknown;
};

const syncChange = (ctx: CrossRigContext, kind: string, payload: unknown, rigId = ctx.rigId) => ({
  rigId: ctx.rigId,
  cursor: null,
  changes: [{ id: crypto.randomUUID(), kind, rigId, clientTime: new Date().toISOString(), payload }],
});
const syncPath = { file: "routes/api.sync.ts", path: () => "/api/sync", params: () => ({}) };
const aReading = (id: string) => ({ id, takenAt: new Date(Date.now() - 60_000).toISOString(), bankVoltageV: 12.9, note: "cross-rig" });

export const crossRigCases: CrossRigCase[] = [
  { name: "sync model.save naming the other rig's branch", ...syncPath, json: (c) => syncChange(c, "model.save", { branchId: c.other.branchId, baseRevision: 1, document: { ...juniperModel, name: "Taken over" } }) },
  { name: "sync reading.edit naming the other rig's reading", ...syncPath, json: (c) => syncChange(c, "reading.edit", { readingId: c.other.readingId, set: { note: "taken over" } }) },
  { name: "sync reading.delete naming the other rig's reading", ...syncPath, json: (c) => syncChange(c, "reading.delete", { readingId: c.other.readingId }) },
  { name: "sync reading.add reusing the other rig's reading id", ...syncPath, json: (c) => syncChange(c, "reading.add", { reading: aReading(c.other.readingId) }) },
  { name: "sync change whose rigId is the other rig, in this rig's envelope", ...syncPath, json: (c) => syncChange(c, "reading.add", { reading: aReading(crypto.randomUUID()) }, c.other.rigId) },
  { name: "sync state.write in a change for the other rig", ...syncPath, json: (c) => syncChange(c, "state.write", { baseVersion: 0, change: { kind: "place", place: { kind: "home" } } }, c.other.rigId) },
  {
    name: "members: withdraw the other rig's invitation",
    file: "routes/rig.members.tsx",
    path: (c) => `/rigs/${c.rigId}/members`,
    params: (c) => ({ rigId: c.rigId }),
    form: (c) => ({ intent: "revoke", inviteId: c.other.inviteId }),
  },
  {
    name: "members: change the role of a member of the other rig only",
    file: "routes/rig.members.tsx",
    path: (c) => `/rigs/${c.rigId}/members`,
    params: (c) => ({ rigId: c.rigId }),
    form: (c) => ({ intent: "role", userId: c.other.memberUserId, role: "owner" }),
  },
  {
    name: "members: remove a member of the other rig only",
    file: "routes/rig.members.tsx",
    path: (c) => `/rigs/${c.rigId}/members`,
    params: (c) => ({ rigId: c.rigId }),
    form: (c) => ({ intent: "remove", userId: c.other.memberUserId }),
  },
  {
    name: "state write on this rig (no id fields; the other rig must not move)",
    file: "routes/api.rigs.$rigId.state.ts",
    path: (c) => `/api/rigs/${c.rigId}/state`,
    params: (c) => ({ rigId: c.rigId }),
    json: () => ({ baseVersion: 0, change: { kind: "place", place: { kind: "home" } } }),
  },
  {
    name: "mode edit on this rig (the branch is the URL rig's; the other rig must not move)",
    file: "routes/api.rigs.$rigId.modes.ts",
    path: (c) => `/api/rigs/${c.rigId}/modes`,
    params: (c) => ({ rigId: c.rigId }),
    json: () => ({ op: "hours", modeId: "nope", expectedRevision: 1, loads: [{ loadId: "fridge", hoursPerDay: 1 }] }),
  },
];
