import { data } from "react-router";

/** The JSON error shape every API route answers with. */
export type ApiError = {
  error: { code: string; message: string; issues?: Array<{ path: (string | number)[]; message: string }> };
};

export function apiError(
  status: number,
  code: string,
  message: string,
  issues?: ApiError["error"]["issues"],
  headers?: HeadersInit,
) {
  return Response.json({ error: { code, message, ...(issues ? { issues } : {}) } } satisfies ApiError, {
    status,
    headers,
  });
}

export function notFound(message = "Not found") {
  return data({ message }, { status: 404 });
}

/** Zod issues as plain path/message pairs for API answers. */
export function issuesOf(error: { issues: Array<{ path: PropertyKey[]; message: string }> }) {
  return error.issues.map((issue) => ({
    path: issue.path.map((p) => (typeof p === "number" ? p : String(p))),
    message: issue.message,
  }));
}

/** Reads a JSON request body; a malformed body becomes a 400 answer, never a 500. */
export async function readJson(request: Request): Promise<{ ok: true; body: unknown } | { ok: false; response: Response }> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.includes("application/json")) {
    return { ok: false, response: apiError(415, "unsupported_media_type", "Send the body as application/json.") };
  }
  try {
    return { ok: true, body: await request.json() };
  } catch {
    return { ok: false, response: apiError(400, "invalid_json", "The request body is not valid JSON.") };
  }
}
