import { describe, expect, test } from "vitest";
import { ConfigError, parseEnv } from "./env.server";

describe("Environment settings", () => {
  test("every setting has a default for local use", () => {
    const env = parseEnv({});
    expect(env.PORT).toBe(3000);
    expect(env.DATABASE_URL).toBe("postgres://tilldawn@127.0.0.1:54329/tilldawn");
  });

  test("a bad port is refused with a message naming the variable", () => {
    expect(() => parseEnv({ PORT: "seventy" })).toThrow(ConfigError);
    expect(() => parseEnv({ PORT: "70000" })).toThrow(/PORT/);
  });

  test("a database URL that is not postgres:// is refused", () => {
    expect(() => parseEnv({ DATABASE_URL: "mysql://x@localhost/db" })).toThrow(/DATABASE_URL: must be a postgres:\/\/ URL/);
  });

  test("overrides are taken from the environment", () => {
    expect(parseEnv({ PORT: "3001" }).PORT).toBe(3001);
  });
});
