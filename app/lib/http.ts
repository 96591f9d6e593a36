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

/** Zod issues as plain path/message pairs for API answers (declared in the engine). */
export { issuesOf } from "~/engine/issues";

/** Default body limits, in bytes. Routes that need more pass their own. */
export const JSON_BODY_LIMIT = 256 * 1024;
export const FORM_BODY_LIMIT = 64 * 1024;

export class BodyTooLargeError extends Error {
  constructor(readonly limit: number) {
    super(`the request body is larger than ${limit} bytes`);
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

/**
 * Reads a request body, counting bytes as they arrive (chunked bodies included: Content-Length
 * is only a hint), and stops with BodyTooLargeError as soon as it passes `limit`.
 */
export async function readBodyBytes(request: Request, limit: number): Promise<Uint8Array> {
  const declared = Number(request.headers.get("content-length") ?? "");
  if (Number.isFinite(declared) && declared > limit) throw new BodyTooLargeError(limit);
  if (!request.body) return new Uint8Array(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => {});
      throw new BodyTooLargeError(limit);
    }
    chunks.push(value);
  }
  return joinChunks(chunks, total);
}

/** The chunks of a streamed body as one array (`total` is their summed length). */
export function joinChunks(chunks: readonly Uint8Array[], total: number): Uint8Array {
  const out = new Uint8Array(total);
  let at = 0;
  for (const chunk of chunks) {
    out.set(chunk, at);
    at += chunk.byteLength;
  }
  return out;
}

function tooLarge(limit: number) {
  return apiError(413, "too_large", `The request body is larger than ${Math.round(limit / 1024)} KB.`);
}

/**
 * Reads a JSON request body within `limit` bytes: a wrong content type is 415, too large 413,
 * malformed JSON 400 — never a 500.
 */
export async function readJson(
  request: Request,
  limit = JSON_BODY_LIMIT,
): Promise<{ ok: true; body: unknown } | { ok: false; response: Response }> {
  const type = (request.headers.get("content-type") ?? "").split(";")[0]!.trim().toLowerCase();
  if (type !== "application/json") {
    return { ok: false, response: apiError(415, "unsupported_media_type", "Send the body as application/json.") };
  }
  let bytes: Uint8Array;
  try {
    bytes = await readBodyBytes(request, limit);
  } catch (error) {
    if (error instanceof BodyTooLargeError) return { ok: false, response: tooLarge(limit) };
    return { ok: false, response: apiError(400, "unreadable_body", "The request body could not be read.") };
  }
  try {
    return { ok: true, body: JSON.parse(new TextDecoder("utf-8", { fatal: true }).decode(bytes)) };
  } catch {
    return { ok: false, response: apiError(400, "invalid_json", "The request body is not valid JSON (UTF-8).") };
  }
}

/**
 * Reads a page form's body (urlencoded, or multipart with a boundary) within `limit` bytes.
 * Anything else — JSON, text/plain, multipart without a boundary, too large, a field with a NUL
 * character — is thrown as a 4xx answer with the JSON error shape, so no action ever turns
 * bad input into a 500.
 */
export async function readForm(request: Request, limit = FORM_BODY_LIMIT): Promise<FormData> {
  const header = request.headers.get("content-type") ?? "";
  const type = header.split(";")[0]!.trim().toLowerCase();
  const urlencoded = type === "application/x-www-form-urlencoded";
  const multipart = type === "multipart/form-data" && /;\s*boundary=/i.test(header);
  if (!urlencoded && !multipart) {
    throw apiError(415, "unsupported_media_type", "Send the form as application/x-www-form-urlencoded or multipart/form-data.");
  }
  let bytes: Uint8Array;
  try {
    bytes = await readBodyBytes(request, limit);
  } catch (error) {
    if (error instanceof BodyTooLargeError) throw tooLarge(limit);
    throw apiError(400, "unreadable_body", "The form could not be read.");
  }
  let form: FormData;
  try {
    form = await new Response(bytes as BodyInit, { headers: { "content-type": header } }).formData();
  } catch {
    throw apiError(400, "invalid_form", "The form could not be read.");
  }
  for (const [name, value] of form.entries()) {
    if (name.includes("\u0000") || (typeof value === "string" && value.includes("\u0000"))) {
      throw apiError(400, "invalid_form", "A field contains a NUL character, which cannot be stored.", [{ path: [name.replace(/\u0000/g, "")], message: "NUL character" }]);
    }
  }
  return form;
}

/**
 * The `intent` field of a small JSON or form body (4 KB at most), or null when there is none or
 * the body cannot be read. For routes whose POST stands in for another method.
 */
export async function readIntentField(request: Request): Promise<string | null> {
  const type = request.headers.get("content-type") ?? "";
  try {
    if (type.includes("application/json")) {
      const read = await readJson(request, 4 * 1024);
      const body = read.ok ? (read.body as { intent?: unknown } | null) : null;
      return typeof body?.intent === "string" ? body.intent : null;
    }
    if (type.includes("form")) {
      const value = (await readForm(request, 4 * 1024)).get("intent");
      return typeof value === "string" ? value : null;
    }
  } catch {
    return null;
  }
  return null;
}
