/**
 * A fixed-window counter per key, kept in this process's memory. Enough for one server; it
 * forgets on restart. `hit` answers whether the request may go on and, if not, when to retry.
 */
export function createRateLimiter(options: { limit: number; windowMs: number; now?: () => number }) {
  const now = options.now ?? Date.now;
  const windows = new Map<string, { startedAt: number; count: number }>();
  return {
    hit(key: string): { ok: true; remaining: number } | { ok: false; retryAfterS: number } {
      const t = now();
      let w = windows.get(key);
      if (!w || t - w.startedAt >= options.windowMs) {
        w = { startedAt: t, count: 0 };
        windows.set(key, w);
        if (windows.size > 10_000) {
          for (const [k, v] of windows) if (t - v.startedAt >= options.windowMs) windows.delete(k);
        }
      }
      if (w.count >= options.limit) {
        return { ok: false, retryAfterS: Math.max(1, Math.ceil((w.startedAt + options.windowMs - t) / 1000)) };
      }
      w.count += 1;
      return { ok: true, remaining: options.limit - w.count };
    },
  };
}

/** The client's address as the server sees it (the socket, or the proxy's X-Forwarded-For). */
export function clientAddress(request: Request): string {
  const forwarded = request.headers.get("x-forwarded-for");
  return forwarded?.split(",")[0]?.trim() || request.headers.get("x-real-ip") || "local";
}
