/**
 * Test helper only: the route's parse → run → status mapping (app/routes/api.v1.projection.ts)
 * without HTTP, so engine tests can check a whole request. The route itself is tested in
 * tests/integration/projection-api.test.ts.
 */
import { parseProjectionRequest, runProjectionRequest, type ProjectionResult } from "./api";
import type { ModelIssue } from "./model";

export function handleProjectionRequest(body: unknown):
  | { status: 200; body: ProjectionResult }
  | { status: 400; body: { code: "invalid_request"; message: string; issues: ModelIssue[] } } {
  const parsed = parseProjectionRequest(body);
  if (!parsed.ok) return { status: 400, body: { code: "invalid_request", message: "The request does not describe a valid rig and state.", issues: parsed.issues } };
  return { status: 200, body: runProjectionRequest(parsed.value) };
}
