import { type RouteConfig, index, route } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),
  route("rigs", "routes/rigs.tsx"),
  route("rigs/:rigId", "routes/rig.tsx"),

  // API (resource routes: no UI)
  route("api/health", "routes/api.health.ts"),
  route("api/v1/projection", "routes/api.v1.projection.ts"),
  route("api/v1/schema", "routes/api.v1.schema.ts"),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
