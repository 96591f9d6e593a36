/**
 * Zod issues → plain `{ path, message }` pairs: the one conversion for the engine's answers and
 * the API's (`app/lib/http.ts` re-exports it). Symbols in a path become strings.
 */
export interface Issue {
  path: (string | number)[];
  message: string;
}

export function issuesOf(error: { issues: ReadonlyArray<{ path: PropertyKey[]; message: string }> }): Issue[] {
  return error.issues.map((issue) => ({
    path: issue.path.map((p) => (typeof p === "number" ? p : String(p))),
    message: issue.message,
  }));
}
