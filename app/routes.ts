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
  route("rigs/:rigId/model", "routes/rig.model.tsx"),
  route("rigs/:rigId/budget", "routes/rig.budget.tsx"),
  route("rigs/:rigId/log", "routes/rig.log.tsx"),
  route("rigs/:rigId/log/import", "routes/rig.log.import.tsx"),
  route("rigs/:rigId/log/:readingId", "routes/rig.log.$readingId.tsx"),
  route("rigs/:rigId/members", "routes/rig.members.tsx"),
  route("rigs/:rigId/photos", "routes/rig.photos.tsx"),
  route("invites/:token", "routes/invite.tsx"),

  // Alerts and devices (issue 13)
  route("rigs/:rigId/alerts", "routes/rig.alerts.tsx"),
  route("alerts/unsubscribe/:token", "routes/alerts.unsubscribe.$token.tsx"),

  // Development only (404 with real SMTP settings)
  route("dev/outbox", "routes/dev.outbox.tsx"),
  route("dev/push", "routes/dev.push.tsx"),

  // API (resource routes: no UI)
  route("api/health", "routes/api.health.ts"),
  route("api/v1/me", "routes/api.v1.me.ts"),
  route("api/v1/projection", "routes/api.v1.projection.ts"),
  route("api/v1/schema", "routes/api.v1.schema.ts"),
  route("api/sync", "routes/api.sync.ts"),
  route("api/rigs/:rigId/readings", "routes/api.rigs.$rigId.readings.ts"),
  route("api/rigs/:rigId/readings.csv", "routes/api.rigs.$rigId.readings.csv.ts"),
  route("api/rigs/:rigId/model", "routes/api.rigs.$rigId.model.ts"),
  route("api/rigs/:rigId/state", "routes/api.rigs.$rigId.state.ts"),
  route("api/rigs/:rigId/modes", "routes/api.rigs.$rigId.modes.ts"),
  route("api/rigs/:rigId/compare", "routes/api.rigs.$rigId.compare.ts"),
  route("api/rigs/:rigId/push", "routes/api.rigs.$rigId.push.ts"),
  route("api/v1/rigs/:rigId/readings", "routes/api.v1.rigs.$rigId.readings.ts"),
  route("api/v1/device-readings.schema.json", "routes/api.v1.device-readings-schema.ts"),
  route("api/rigs/:rigId/photos", "routes/api.rigs.photos.ts"),
  route("api/rigs/:rigId/photos/:photoId", "routes/api.rigs.photos.$photoId.ts"),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
