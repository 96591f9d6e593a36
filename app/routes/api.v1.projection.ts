import type { Route } from "./+types/api.v1.projection";
import { getEnv } from "~/env.server";
import { apiError, readJson } from "~/lib/http";
import { clientAddress, createRateLimiter } from "~/lib/rate-limit.server";
import { parseProjectionRequest, runProjectionRequest } from "~/engine/api";

const limiter = createRateLimiter({ limit: getEnv().PROJECTION_RATE_PER_MINUTE, windowMs: 60_000 });

/** POST /api/v1/projection — stateless: a rig model and its state in, every engine result out. */
export async function action({ request, context }: Route.ActionArgs) {
  if (request.method !== "POST") {
    return apiError(405, "method_not_allowed", "Use POST.", undefined, { allow: "POST" });
  }
  const gate = limiter.hit(clientAddress(context));
  if (!gate.ok) {
    return apiError(429, "rate_limited", `Too many projections; try again in ${gate.retryAfterS} s.`, undefined, {
      "retry-after": String(gate.retryAfterS),
    });
  }
  const body = await readJson(request);
  if (!body.ok) return body.response;
  // Schema, references between the model's parts and the state are all checked; never throws.
  const parsed = parseProjectionRequest(body.body);
  if (!parsed.ok) {
    return apiError(
      400,
      "invalid_request",
      "The request does not describe a valid rig and state (schema: GET /api/v1/schema).",
      parsed.issues,
    );
  }
  return Response.json(runProjectionRequest(parsed.value));
}

export function loader() {
  return apiError(405, "method_not_allowed", "Use POST with a JSON body; the schema is at GET /api/v1/schema.", undefined, {
    allow: "POST",
  });
}
