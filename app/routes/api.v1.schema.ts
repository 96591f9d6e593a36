import { projectionRequestJsonSchema } from "~/engine/api";

let cached: unknown;

/** GET /api/v1/schema — the JSON Schema of the POST /api/v1/projection request body. */
export function loader() {
  cached ??= projectionRequestJsonSchema();
  return Response.json(cached, { headers: { "cache-control": "public, max-age=3600" } });
}
