import { z } from "zod";

/**
 * Every setting has a default for local use and can be overridden by the environment.
 * A missing or bad value stops the process with a message naming the variable.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  DATABASE_URL: z
    .url({ protocol: /^postgres(ql)?$/, message: "must be a postgres:// URL" })
    .default("postgres://tilldawn@127.0.0.1:54329/tilldawn"),
  DATABASE_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
  APP_URL: z.url().optional(),
  PROJECTION_RATE_PER_MINUTE: z.coerce.number().int().min(1).default(120),
});

export type Env = z.infer<typeof envSchema>;

export function parseEnv(source: Record<string, string | undefined>): Env {
  const result = envSchema.safeParse(source);
  if (result.success) return result.data;
  const lines = result.error.issues.map(
    (issue) => `  ${issue.path.join(".") || "(environment)"}: ${issue.message}`,
  );
  throw new ConfigError(`Tilldawn cannot start: bad configuration.\n${lines.join("\n")}`);
}

export class ConfigError extends Error {
  override name = "ConfigError";
}

let cached: Env | undefined;

/** The validated environment; on bad values, prints a clear message and exits. */
export function getEnv(): Env {
  if (cached) return cached;
  try {
    cached = parseEnv(process.env);
  } catch (error) {
    if (error instanceof ConfigError) {
      console.error(error.message);
      process.exit(78); // EX_CONFIG
    }
    throw error;
  }
  return cached;
}
