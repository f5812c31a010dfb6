import { z } from "zod";
import { LIS_KEY_PATTERN } from "./key-format";

/** The highest rate an administrator may set (lis_connections_rate_range in the schema). */
export const MAX_RATE_PER_MINUTE = 10_000_000;
export const DEFAULT_RATE_PER_MINUTE = 6000;

const name = z
  .string({ error: "Give the connection a name." })
  .trim()
  .min(1, "Give the connection a name.")
  .max(120, "Keep the name to 120 characters.");
const contactEmail = z
  .string({ error: "Give a contact e-mail address." })
  .trim()
  .toLowerCase()
  .pipe(z.email("Give a contact e-mail address such as lis-team@hospital.example."));
const ratePerMinute = z.coerce
  .number({ error: "The rate limit is a whole number of requests a minute." })
  .int("The rate limit is a whole number of requests a minute.")
  .min(1, "The rate limit is at least 1 request a minute.")
  .max(MAX_RATE_PER_MINUTE, `The rate limit is at most ${MAX_RATE_PER_MINUTE.toLocaleString("en")} requests a minute.`);

/** POST /api/v1/lis-connections */
export const createLisConnectionBody = z.strictObject({ name, contactEmail, ratePerMinute: ratePerMinute.optional() });
export type CreateLisConnectionInput = z.output<typeof createLisConnectionBody>;

/** PATCH /api/v1/lis-connections/{id}: what it names changes, nothing else. */
export const updateLisConnectionBody = z
  .strictObject({ name: name.optional(), contactEmail: contactEmail.optional(), ratePerMinute: ratePerMinute.optional() })
  .refine((b) => b.name !== undefined || b.contactEmail !== undefined || b.ratePerMinute !== undefined, {
    message: "Name at least one of name, contactEmail and ratePerMinute.",
  });
export type UpdateLisConnectionInput = z.output<typeof updateLisConnectionBody>;

export const lisConnectionParams = z.object({ id: z.uuid("The LIS connection id must be a UUID.") });

const person = z.object({ id: z.uuid(), name: z.string() });
const instant = z.iso.datetime();

/** An LIS connection as the admin API answers it: never the key, only its prefix. */
export const lisConnectionSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  contactEmail: z.string(),
  /** The key's first 12 characters, e.g. "bwk_3f9a1c0d". */
  keyPrefix: z.string(),
  ratePerMinute: z.number().int(),
  status: z.enum(["active", "revoked"]),
  createdAt: instant,
  createdBy: person.nullable(),
  updatedAt: instant,
  revokedAt: instant.nullable(),
  revokedBy: person.nullable(),
  lastUsedAt: instant.nullable(),
});
export type LisConnectionOut = z.output<typeof lisConnectionSchema>;

/** GET /api/v1/lis-connections */
export const lisConnectionListSchema = z.object({ connections: z.array(lisConnectionSchema) });

/** POST /api/v1/lis-connections (201): the connection and its key, answered this once. */
export const createdLisConnectionSchema = lisConnectionSchema.extend({ key: z.string().regex(LIS_KEY_PATTERN) });

/** Counts of scores in a period, by flag. */
export const flagCountsSchema = z.object({
  total: z.number().int(),
  L: z.number().int(),
  N: z.number().int(),
  H: z.number().int(),
  LL: z.number().int(),
  HH: z.number().int(),
});
export type FlagCounts = z.output<typeof flagCountsSchema>;

/** GET /api/v1/lis-connections/usage */
export const lisUsageSchema = z.object({
  generatedAt: instant,
  connections: z.array(
    z.object({
      id: z.uuid(),
      name: z.string(),
      keyPrefix: z.string(),
      status: z.enum(["active", "revoked"]),
      last24h: flagCountsSchema,
      last7d: flagCountsSchema,
      analytes: z.array(z.object({ code: z.string(), name: z.string(), last24h: flagCountsSchema, last7d: flagCountsSchema })),
    }),
  ),
});
export type LisUsageOut = z.output<typeof lisUsageSchema>;
