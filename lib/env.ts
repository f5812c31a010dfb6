import { z } from "zod";

const postgresUrl = (name: string, whenUnset?: string) =>
  z.string(whenUnset ? { error: whenUnset } : undefined).regex(/^postgres(ql)?:\/\//, `${name} must be a postgres:// connection string`);

const port = (name: string) => z.coerce.number({ error: `${name} must be a port number` }).int().min(1).max(65535);

/** "1" or "0"; where it may be absent, the start command decides (see `demoMode`). */
const demoFlag = z.enum(["0", "1"], { error: "BELLWETHER_DEMO must be 1 (demo) or 0" });

/**
 * The environment, validated once with zod. Read lazily so that `next build` (which imports
 * server modules without a database) does not need the runtime variables.
 */
const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: postgresUrl("DATABASE_URL", "DATABASE_URL is not set; `npm start` sets it for the private PostgreSQL"),
  BELLWETHER_DEMO: demoFlag.default("0").transform((v) => v === "1"),
  NEXTAUTH_SECRET: z
    .string({ error: "NEXTAUTH_SECRET is not set; `npm start` creates one in the data folder" })
    .min(32, "NEXTAUTH_SECRET must be at least 32 characters"),
  NEXTAUTH_URL: z.url("NEXTAUTH_URL must be a URL such as http://127.0.0.1:3000").optional(),
  BELLWETHER_SIGN_IN_MAX_FAILURES: z.coerce.number().int().min(1).default(5),
  BELLWETHER_SIGN_IN_LOCK_MINUTES: z.coerce.number().int().min(1).default(15),
});

export type Env = z.infer<typeof schema>;

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

let cached: Env | undefined;

/** The process environment, validated on first use (instrumentation.ts calls it at start-up). */
export function env(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}

/** What `npm start` reads before anything runs; the app's own variables are checked by `parseEnv`. */
const startFields = z.object({
  PORT: port("PORT").default(3000),
  BELLWETHER_DATA_DIR: z.string().min(1).default(".data"),
  BELLWETHER_PG_PORT: port("BELLWETHER_PG_PORT").default(54329),
  DATABASE_URL: postgresUrl("DATABASE_URL").optional(),
  BELLWETHER_MIGRATION_URL: postgresUrl("BELLWETHER_MIGRATION_URL").optional(),
  BELLWETHER_DEMO: demoFlag.optional(),
});

const startSchema = startFields.refine((e) => !e.BELLWETHER_MIGRATION_URL || e.DATABASE_URL, {
    path: ["BELLWETHER_MIGRATION_URL"],
    message: "BELLWETHER_MIGRATION_URL is set but DATABASE_URL is not; give both, or neither for the private PostgreSQL",
  });

export type StartEnv = z.infer<typeof startSchema>;

export function parseStartEnv(source: Record<string, string | undefined>): StartEnv {
  return validate(startSchema, source);
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
