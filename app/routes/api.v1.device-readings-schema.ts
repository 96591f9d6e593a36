import { deviceReadingJsonSchema } from "~/alerts/device-readings";

/** GET /api/v1/device-readings.schema.json — the JSON Schema of what a device posts. Public. */
export function loader() {
  return Response.json(deviceReadingJsonSchema, { headers: { "content-type": "application/schema+json", "cache-control": "public, max-age=3600" } });
}
