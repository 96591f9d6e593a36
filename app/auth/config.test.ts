import { describe, expect, test } from "vitest";
import { mkdtempSync, readFileSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { ConfigError, fileSecrets, parseEnv } from "~/env.server";

const secrets = {
  SESSION_SECRET: "s".repeat(40),
  TOTP_SECRET: "a1".repeat(32),
  SMTP_URL: "smtps://mailer:pw@smtp.example.net:465",
};

describe("Sign-in settings", () => {
  test("development and a loopback production run use the local mail fake and development secrets", () => {
    const dev = parseEnv({});
    expect(dev.devOutbox).toBe(true);
    expect(dev.TOTP_SECRET).toMatch(/^[0-9a-f]{64}$/);
    const local = parseEnv({ NODE_ENV: "production", APP_URL: "http://127.0.0.1:3000" });
    expect(local.local).toBe(true);
    expect(local.devOutbox).toBe(true);
  });

  test("production on a public address refuses to start without the secrets and SMTP, naming each", () => {
    let message = "";
    try {
      parseEnv({ NODE_ENV: "production", APP_URL: "https://tilldawn.example" });
    } catch (error) {
      expect(error).toBeInstanceOf(ConfigError);
      message = (error as Error).message;
    }
    expect(message).toContain("SESSION_SECRET: is required in production");
    expect(message).toContain("TOTP_SECRET: is required in production");
    expect(message).toContain("SMTP_URL: is required in production");
  });

  test("a partial production setup names what is missing, including APP_URL", () => {
    expect(() => parseEnv({ NODE_ENV: "production", SESSION_SECRET: secrets.SESSION_SECRET })).toThrow(/APP_URL: is required/);
  });

  test("production with every setting turns the development outbox off", () => {
    const env = parseEnv({ NODE_ENV: "production", APP_URL: "https://tilldawn.example", ...secrets });
    expect(env.devOutbox).toBe(false);
    expect(env.local).toBe(false);
  });

  test("a TOTP secret that is not 64 hex characters is refused", () => {
    expect(() => parseEnv({ TOTP_SECRET: "short" })).toThrow(/TOTP_SECRET: must be 64 hex characters/);
  });
});

describe("Local secrets (issue 9, finding 7)", () => {
  test("a local run makes random secrets on first start, keeps them in a mode-600 file, and reads the same ones again", () => {
    const file = path.join(mkdtempSync(path.join(tmpdir(), "tilldawn-secrets-")), "nested", "local-secrets.json");
    const first = fileSecrets(file);
    expect(first.TOTP_SECRET).toMatch(/^[0-9a-f]{64}$/);
    expect(first.SESSION_SECRET.length).toBeGreaterThanOrEqual(32);
    expect(statSync(file).mode & 0o777).toBe(0o600);
    expect(fileSecrets(file)).toEqual(first);
    expect(JSON.parse(readFileSync(file, "utf8"))).toEqual(first);
    const other = fileSecrets(path.join(mkdtempSync(path.join(tmpdir(), "tilldawn-secrets-")), "s.json"));
    expect(other.TOTP_SECRET).not.toBe(first.TOTP_SECRET);
  });

  test("the development secrets are no longer constants in the source: two parses without secrets differ", () => {
    expect(parseEnv({}).TOTP_SECRET).not.toBe(parseEnv({}).TOTP_SECRET);
    expect(parseEnv({}).SESSION_SECRET).not.toBe(parseEnv({}).SESSION_SECRET);
    expect(parseEnv({}, () => ({ SESSION_SECRET: "k".repeat(40), TOTP_SECRET: "b2".repeat(32) })).TOTP_SECRET).toBe("b2".repeat(32));
  });
});
