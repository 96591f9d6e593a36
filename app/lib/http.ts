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

/* ------------------------------------------------------------ small answers */

/** 400 with the API's error shape: the request is malformed or breaks a rule. */
export function badRequest(code: string, message: string, issues?: ApiError["error"]["issues"]) {
  return apiError(400, code, message, issues);
}

/** 409 with the API's error shape; `extra` carries what the caller needs to retry (e.g. `revision`). */
export function conflict(code: string, message: string, extra: Record<string, unknown> = {}) {
  return Response.json({ error: { code, message }, ...extra }, { status: 409 });
}

/** The human message inside a thrown answer: page-shaped `{ message }` or API-shaped `{ error: { message } }`. */
export function thrownMessage(body: unknown): string | null {
  if (typeof body === "string") return body;
  if (body && typeof body === "object") {
    const { message, error } = body as { message?: unknown; error?: { message?: unknown } };
    if (typeof message === "string") return message;
    if (error && typeof error.message === "string") return error.message;
  }
  return null;
}
