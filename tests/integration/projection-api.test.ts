import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { action, loader } from "~/routes/api.v1.projection";
import { loader as schemaLoader } from "~/routes/api.v1.schema";

const fixture = readFileSync(new URL("../fixtures/projection-request.json", import.meta.url), "utf8");
/** The socket address each request came from, as scripts/serve.mjs hands it in the context. */
const peer = new WeakMap<Request, string>();
const args = (request: Request) => ({ request, params: {}, context: { clientAddress: peer.get(request) } }) as unknown as Parameters<typeof action>[0];

function post(body: string, headers: Record<string, string> = { "content-type": "application/json" }, ip: string = crypto.randomUUID()) {
  const request = new Request("http://127.0.0.1/api/v1/projection", { method: "POST", headers, body });
  peer.set(request, ip);
  return request;
}

describe("POST /api/v1/projection", () => {
  test("the README's request (the demo rig) answers every engine result", async () => {
    const res = await action(args(post(fixture)));
    expect(res.status).toBe(200);
    const body = (await res.json()) as {
      projection: { banks: unknown[] };
      circuitGraph: { loads: unknown[] };
    };
    expect(Object.keys(body)).toEqual(expect.arrayContaining(["projection", "budget", "audit", "circuitGraph", "autonomy"]));
    expect(body.projection.banks.length).toBeGreaterThan(0);
    expect(body.circuitGraph.loads.length).toBe(JSON.parse(fixture).model.loads.length);
  });

  test("a body that is not JSON answers 400 with a clear code", async () => {
    const res = await action(args(post("{not json")));
    expect(res.status).toBe(400);
    expect(await res.json()).toMatchObject({ error: { code: "invalid_json" } });
  });

  test("a body sent as another media type answers 415", async () => {
    const res = await action(args(post(fixture, { "content-type": "text/plain" })));
    expect(res.status).toBe(415);
  });

  test("a wrong field answers 400 with the zod issue path", async () => {
    const bad = JSON.parse(fixture);
    bad.model.banks[0].ratedAh = -5;
    const res = await action(args(post(JSON.stringify(bad))));
    expect(res.status).toBe(400);
    const body = (await res.json()) as { error: { code: string; issues: Array<{ path: unknown[] }> } };
    expect(body.error.code).toBe("invalid_request");
    expect(body.error.issues.map((i) => i.path)).toContainEqual(["model", "banks", 0, "ratedAh"]);
  });

  test("a load fed by an unknown bus answers 400 naming the part", async () => {
    const bad = JSON.parse(fixture);
    bad.model.circuits[0].from = { kind: "bus", id: "no-such-bus" };
    const res = await action(args(post(JSON.stringify(bad))));
    expect(res.status).toBe(400);
    expect(JSON.stringify(await res.json())).toContain("no-such-bus");
  });

  test("other methods answer 405 with the allowed method", async () => {
    const res = await loader();
    expect(res.status).toBe(405);
    expect(res.headers.get("allow")).toBe("POST");
  });

  test("too many requests from one client answer 429 with when to retry", async () => {
    const ip = "203.0.113.9";
    let last: Response | undefined;
    for (let i = 0; i < 121; i++) last = await action(args(post("{}", undefined, ip)));
    expect(last?.status).toBe(429);
    expect(Number(last?.headers.get("retry-after"))).toBeGreaterThan(0);
  });

  test("a new X-Forwarded-For or X-Real-IP on every request does not dodge the limit (finding 5)", async () => {
    const ip = `192.0.2.${Math.floor(Math.random() * 250)}`;
    let last: Response | undefined;
    for (let i = 0; i < 121; i++) {
      last = await action(args(post("{}", { "content-type": "application/json", "x-forwarded-for": `10.0.${i}.1`, "x-real-ip": `10.1.${i}.1` }, ip)));
    }
    expect(last?.status).toBe(429);
    expect(Number(last?.headers.get("retry-after"))).toBeGreaterThan(0);
    // Another client (another socket address) is not locked out by that one.
    expect((await action(args(post("{}", undefined, `192.0.2.${(Math.floor(Math.random() * 250) + 1) % 250}x`)))).status).toBe(400);
  });
});

describe("GET /api/v1/schema", () => {
  test("serves the request's JSON Schema, generated from the zod schema", async () => {
    const res = schemaLoader();
    expect(res.status).toBe(200);
    const schema = (await res.json()) as { $schema: string; properties: Record<string, unknown>; required: string[] };
    expect(schema.$schema).toContain("json-schema.org");
    expect(Object.keys(schema.properties)).toEqual(expect.arrayContaining(["model", "state"]));
    expect(schema.required).toEqual(expect.arrayContaining(["model", "state"]));
  });
});
