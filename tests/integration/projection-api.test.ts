import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { action, loader } from "~/routes/api.v1.projection";
import { loader as schemaLoader } from "~/routes/api.v1.schema";

const fixture = readFileSync(new URL("../fixtures/projection-request.json", import.meta.url), "utf8");
const args = (request: Request) => ({ request, params: {}, context: {} }) as Parameters<typeof action>[0];

function post(body: string, headers: Record<string, string> = { "content-type": "application/json" }, ip: string = crypto.randomUUID()) {
  return new Request("http://127.0.0.1/api/v1/projection", {
    method: "POST",
    headers: { "x-forwarded-for": ip, ...headers },
    body,
  });
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
