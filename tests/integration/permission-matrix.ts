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
  "routes/members.tsx": {
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
  "routes/api.rigs.model.ts": { GET: { expect: members() } },
  "routes/api.rigs.state.ts": { GET: { expect: members() }, POST: { expect: crewUp(), json: () => ({}) } },
  "routes/api.rigs.modes.ts": { GET: { expect: "notAllowed" }, POST: { expect: ownerOnly(), json: () => ({}) } },
  "routes/not-found.tsx": { GET: { expect: "notFound" } },
};
