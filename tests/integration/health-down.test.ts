// Finding 9 of issue 9: with the database unreachable, /api/health says "down" (503) and
// nothing about the failing query or the address it tried.
import { afterAll, expect, test } from "vitest";

const saved = process.env.DATABASE_URL;
afterAll(() => {
  process.env.DATABASE_URL = saved;
});

test("with the database down, /api/health answers 503 \"down\" without the SQL or the error text", async () => {
  process.env.DATABASE_URL = "postgres://tilldawn@127.0.0.1:9/unreachable";
  const { loader } = await import("~/routes/api.health");
  const answer = await loader();
  expect(answer.status).toBe(503);
  expect(answer.headers.get("content-type")).toMatch(/application\/json/);
  const text = await answer.text();
  expect(JSON.parse(text)).toEqual({ status: "degraded", database: { status: "down" } });
  expect(text).not.toMatch(/select|ECONNREFUSED|127\.0\.0\.1|9/i);
});
