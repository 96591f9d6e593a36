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

/**
 * The client's address, as the server (scripts/serve.mjs) took it from the connection: the
 * socket's peer, or — only with TRUST_PROXY=n — the address n proxies back in
 * X-Forwarded-For. Headers a client sends never decide it here. "unknown" when the app runs
 * without that server (route tests that pass no context).
 */
export function clientAddress(context: unknown): string {
  const address = (context as { clientAddress?: unknown } | null | undefined)?.clientAddress;
  return typeof address === "string" && address ? address : "unknown";
}

/** True for a loopback peer (127.0.0.0/8, ::1, and IPv4-mapped 127.x). */
export function isLoopback(address: string): boolean {
  const a = address.replace(/^::ffff:/i, "");
  return a === "::1" || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(a);
}
