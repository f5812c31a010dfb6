import { z } from "zod";
import { parseTrustedProxies, type IpRange } from "./api/client-address";
import { LIS_KEY_PATTERN } from "./lis/key-format";

const whole = (fallback: number, min: number) => z.coerce.number().int().min(min).default(fallback);

/** Variables an older Bellwether read: refused with a pointer rather than silently ignored. */
const replaced = (by: string) =>
  z.never({ error: `no longer read; use ${by} (see the README's environment table)` }).optional();

const postgresUrl = (name: string, whenUnset?: string) =>
  z.string(whenUnset ? { error: whenUnset } : undefined).regex(/^postgres(ql)?:\/\//, `${name} must be a postgres:// connection string`);

const port = (name: string) => z.coerce.number({ error: `${name} must be a port number` }).int().min(1).max(65535);

/** "1" or "0"; where it may be absent, the start command decides (see `demoMode`). */
const demoFlag = z.enum(["0", "1"], { error: "BELLWETHER_DEMO must be 1 (demo) or 0" });

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
  DATABASE_URL: postgresUrl("DATABASE_URL", "DATABASE_URL is not set; `npm start` sets it for the private PostgreSQL"),
  BELLWETHER_DEMO: demoFlag.default("0").transform((v) => v === "1"),
  NEXTAUTH_SECRET: z
    .string({ error: "NEXTAUTH_SECRET is not set; `npm start` creates one in the data folder" })
    .min(32, "NEXTAUTH_SECRET must be at least 32 characters"),
  NEXTAUTH_URL: z.url("NEXTAUTH_URL must be a URL such as http://127.0.0.1:3000").optional(),
  // Sign-in throttling (lib/auth/sign-in-throttle.ts): per e-mail and client address, and per address.
  BELLWETHER_SIGN_IN_FREE_FAILURES: whole(3, 0),
  BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS: whole(30, 1),
  BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES: whole(15, 1),
  BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES: whole(30, 1),
  BELLWETHER_SIGN_IN_WINDOW_MINUTES: whole(60, 1),
  BELLWETHER_SIGN_IN_MAX_FAILURES: replaced("BELLWETHER_SIGN_IN_FREE_FAILURES and BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES"),
  BELLWETHER_SIGN_IN_LOCK_MINUTES: replaced("BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES and BELLWETHER_SIGN_IN_WINDOW_MINUTES"),
  // E-mail through Resend's SDK (lib/mail). Without a key nothing is sent: messages stay queued in
  // the outbox. `npm start` and the tests point RESEND_BASE_URL at the local fake provider.
  RESEND_API_KEY: z.string().trim().min(1, "RESEND_API_KEY must not be empty; leave it unset to keep mail queued").optional(),
  RESEND_BASE_URL: z
    .url("RESEND_BASE_URL must be a URL such as http://127.0.0.1:4010 (the local fake) or https://api.resend.com")
    .transform((u) => u.replace(/\/+$/, ""))
    .optional(),
  MAIL_FROM: z
    .string()
    .trim()
    .regex(/^(?:[^<>]+<[^\s@<>]+@[^\s@<>]+>|[^\s@<>]+@[^\s@<>]+)$/, 'MAIL_FROM must be an address, or "Name <address>"')
    .default("Bellwether <bellwether@localhost>"),
  /** How often the app's mail job looks for messages to deliver. */
  BELLWETHER_MAIL_INTERVAL_SECONDS: whole(30, 1),
  /** Proxies whose X-Forwarded-For is believed (scripts/serve.ts); none by default. */
  BELLWETHER_TRUSTED_PROXIES: z
    .string()
    .optional()
    .transform((text, ctx): IpRange[] => {
      try {
        return parseTrustedProxies(text);
      } catch (err) {
        ctx.addIssue({ code: "custom", message: `${(err as Error).message}; list addresses or CIDR ranges, comma-separated` });
        return z.NEVER;
      }
    }),
});

export type Env = z.infer<typeof schema>;

export type EngineEnv = z.infer<typeof engineSchema>;

/** Validates against a schema; throws one error that lists every problem in plain words. */
function validate<S extends z.ZodType>(s: S, source: Record<string, string | undefined>): z.infer<S> {
  const parsed = s.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  - ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Bellwether cannot start, the environment is not valid:\n${lines.join("\n")}`);
  }
  return parsed.data;
}

/** Validates the app's environment. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  return validate(schema, source);
}

/** Validates only the variables that identify the running code (see lib/engine.ts). */
export function parseEngineEnv(source: Record<string, string | undefined>): EngineEnv {
  return validate(engineSchema, source);
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

/** What `npm start` reads before anything runs; the app's own variables are checked by `parseEnv`. */
const startFields = z.object({
  PORT: port("PORT").default(3000),
  BELLWETHER_DATA_DIR: z.string().min(1).default(".data"),
  BELLWETHER_PG_PORT: port("BELLWETHER_PG_PORT").default(54329),
  DATABASE_URL: postgresUrl("DATABASE_URL").optional(),
  BELLWETHER_MIGRATION_URL: postgresUrl("BELLWETHER_MIGRATION_URL").optional(),
  BELLWETHER_DEMO: demoFlag.optional(),
  // The demo seed's LIS connection (db/seed.ts): its key (else one is generated and printed once)
  // and its rate limit.
  BELLWETHER_DEMO_LIS_KEY: z
    .string()
    .regex(LIS_KEY_PATTERN, 'BELLWETHER_DEMO_LIS_KEY must be "bwk_" followed by 43 base64url characters (A-Z, a-z, 0-9, - and _)')
    .optional(),
  BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: z.coerce
    .number({ error: "BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be a whole number of requests a minute" })
    .int("BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be a whole number of requests a minute")
    .min(1, "BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be at least 1")
    .max(10_000_000, "BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be at most 10000000")
    .optional(),
});

const startSchema = startFields.refine((e) => !e.BELLWETHER_MIGRATION_URL || e.DATABASE_URL, {
    path: ["BELLWETHER_MIGRATION_URL"],
    message: "BELLWETHER_MIGRATION_URL is set but DATABASE_URL is not; give both, or neither for the private PostgreSQL",
  });

export type StartEnv = z.infer<typeof startSchema>;

export function parseStartEnv(source: Record<string, string | undefined>): StartEnv {
  return validate(startSchema, source);
}

/** The demo seed's LIS connection settings, validated. */
export function parseDemoLisEnv(source: Record<string, string | undefined>): { key?: string; ratePerMinute?: number } {
  const e = validate(startFields.pick({ BELLWETHER_DEMO_LIS_KEY: true, BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: true }), source);
  return { key: e.BELLWETHER_DEMO_LIS_KEY, ratePerMinute: e.BELLWETHER_DEMO_LIS_RATE_PER_MINUTE };
}

/** The schema owner's connection string, for tools that change the schema (drizzle-kit). */
export function parseMigrationUrl(source: Record<string, string | undefined>): string | undefined {
  return validate(startFields.pick({ BELLWETHER_MIGRATION_URL: true }), source).BELLWETHER_MIGRATION_URL;
}

/**
 * Demo mode seeds the invented laboratory into an empty database and allows its published
 * passwords. It is on for the private PostgreSQL and off for a database given by DATABASE_URL,
 * unless BELLWETHER_DEMO says otherwise.
 */
export function demoMode(e: StartEnv): boolean {
  return e.BELLWETHER_DEMO === undefined ? !e.DATABASE_URL : e.BELLWETHER_DEMO === "1";
}
