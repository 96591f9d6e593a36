import { describe, expect, test } from "vitest";
import { ConfigError, parseEnv } from "~/env.server";

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
