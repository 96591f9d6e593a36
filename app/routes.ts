import { type RouteConfig, index, route } from "@react-router/dev/routes";

// Every route is listed in tests/integration/permission-matrix.ts with who may use it.
export default [
  index("routes/home.tsx"),

  // Accounts
  route("sign-in", "routes/sign-in.tsx"),
  route("auth/verify", "routes/auth.verify.tsx"),
  route("sign-out", "routes/sign-out.ts"),
  route("welcome", "routes/welcome.tsx"),
  route("account", "routes/account.tsx"),

  // Rigs and who is on them
  route("rigs", "routes/rigs.tsx"),
  route("rigs/:rigId", "routes/rig.tsx"),
  route("rigs/:rigId/members", "routes/members.tsx"),
  route("invites/:token", "routes/invite.tsx"),

  // Development only (404 with real SMTP settings)
  route("dev/outbox", "routes/dev.outbox.tsx"),

  // API (resource routes: no UI)
  route("api/health", "routes/api.health.ts"),
  route("api/v1/me", "routes/api.v1.me.ts"),
  route("api/v1/projection", "routes/api.v1.projection.ts"),
  route("api/v1/schema", "routes/api.v1.schema.ts"),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
