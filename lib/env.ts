import { z } from "zod";

/**
 * The environment, validated once with zod. Read lazily so that `next build` (which imports
 * server modules without a database) does not need the runtime variables.
 */
const schema = z.object({
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

/** Validates an environment; throws one error that lists every problem in plain words. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  const parsed = schema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  - ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Bellwether cannot start, the environment is not valid:\n${lines.join("\n")}`);
  }
  return parsed.data;
}

let cached: Env | undefined;

/** The process environment, validated on first use (instrumentation.ts calls it at start-up). */
export function env(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}
