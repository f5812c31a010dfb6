import { z } from "zod";

/**
 * The environment, validated once with zod. Read lazily so that `next build` (which imports
 * server modules without a database) does not need the runtime variables.
 */

/** What identifies the running code; optional, and read outside the app too (the command line). */
const engineSchema = z.object({
  BELLWETHER_COMMIT: z
    .string()
    .regex(/^[0-9a-fA-F]{7,40}$/, "BELLWETHER_COMMIT must be a git commit hash (7 to 40 hex digits)")
    .optional(),
});

const schema = engineSchema.extend({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z
    .string({ error: "DATABASE_URL is not set; `npm start` sets it for the private PostgreSQL" })
    .regex(/^postgres(ql)?:\/\//, "DATABASE_URL must be a postgres:// connection string"),
  NEXTAUTH_SECRET: z
    .string({ error: "NEXTAUTH_SECRET is not set; `npm start` creates one in the data folder" })
    .min(32, "NEXTAUTH_SECRET must be at least 32 characters"),
  NEXTAUTH_URL: z.url("NEXTAUTH_URL must be a URL such as http://127.0.0.1:3000").optional(),
  BELLWETHER_SIGN_IN_MAX_FAILURES: z.coerce.number().int().min(1).default(5),
  BELLWETHER_SIGN_IN_LOCK_MINUTES: z.coerce.number().int().min(1).default(15),
});

export type Env = z.infer<typeof schema>;

export type EngineEnv = z.infer<typeof engineSchema>;

function parseWith<T extends z.ZodType>(s: T, source: Record<string, string | undefined>): z.infer<T> {
  const parsed = s.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  - ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Bellwether cannot start, the environment is not valid:\n${lines.join("\n")}`);
  }
  return parsed.data;
}

/** Validates an environment; throws one error that lists every problem in plain words. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  return parseWith(schema, source);
}

/** Validates only the variables that identify the running code (see lib/engine.ts). */
export function parseEngineEnv(source: Record<string, string | undefined>): EngineEnv {
  return parseWith(engineSchema, source);
}

let cached: Env | undefined;

/** The process environment, validated on first use (instrumentation.ts calls it at start-up). */
export function env(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}

let cachedEngine: EngineEnv | undefined;

/** The engine variables of the process environment, validated on first use; needs no database. */
export function engineEnv(): EngineEnv {
  cachedEngine ??= parseEngineEnv(process.env);
  return cachedEngine;
}
