import { describe, expect, test } from "vitest";
import { crossSiteReason } from "./csrf.server";

const ours = ["https://tilldawn.example"];
const post = (headers: Record<string, string>, method = "POST") =>
  new Request("https://tilldawn.example/rigs", { method, headers });

describe("The same-origin check for state-changing requests", () => {
  test("accepts a POST from our own origin", () => {
    expect(crossSiteReason(post({ origin: "https://tilldawn.example", "sec-fetch-site": "same-origin" }), ours)).toBeNull();
    expect(crossSiteReason(post({ origin: "https://tilldawn.example" }), ours)).toBeNull();
  });

  test("accepts a POST with no Origin when the browser says same-origin or none", () => {
    expect(crossSiteReason(post({ "sec-fetch-site": "same-origin" }), ours)).toBeNull();
    expect(crossSiteReason(post({ "sec-fetch-site": "none" }), ours)).toBeNull();
  });

  test("refuses another origin, a cross-site or same-site fetch, an opaque origin, and a request naming no origin", () => {
    expect(crossSiteReason(post({ origin: "https://evil.example" }), ours)).toMatch(/not this app/);
    expect(crossSiteReason(post({ origin: "null" }), ours)).toMatch(/not this app/);
    expect(crossSiteReason(post({ "sec-fetch-site": "cross-site" }), ours)).toMatch(/cross-site/);
    expect(crossSiteReason(post({ origin: "https://tilldawn.example", "sec-fetch-site": "same-site" }), ours)).toMatch(/same-site/);
    expect(crossSiteReason(post({}), ours)).toMatch(/no origin/);
  });

  test("leaves reads alone", () => {
    expect(crossSiteReason(post({ origin: "https://evil.example" }, "GET"), ours)).toBeNull();
  });
});
