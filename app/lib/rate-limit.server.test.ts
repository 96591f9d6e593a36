import { describe, expect, test } from "vitest";
import { createRateLimiter } from "./rate-limit.server";

describe("Rate limiter", () => {
  test("allows the limit within a window, then refuses with the seconds to wait", () => {
    let t = 0;
    const limiter = createRateLimiter({ limit: 2, windowMs: 60_000, now: () => t });
    expect(limiter.hit("a").ok).toBe(true);
    expect(limiter.hit("a").ok).toBe(true);
    t = 15_000;
    expect(limiter.hit("a")).toEqual({ ok: false, retryAfterS: 45 });
    expect(limiter.hit("b").ok).toBe(true);
    t = 60_000;
    expect(limiter.hit("a").ok).toBe(true);
  });
});
