import { z } from "zod";

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

/** An LIS connection as the admin API answers it: never the key, only its prefix. */
export interface LisConnectionOut {
  id: string;
  name: string;
  contactEmail: string;
  keyPrefix: string;
  ratePerMinute: number;
  status: "active" | "revoked";
  createdAt: string;
  createdBy: { id: string; name: string } | null;
  updatedAt: string;
  revokedAt: string | null;
  revokedBy: { id: string; name: string } | null;
  lastUsedAt: string | null;
}

/** Counts of scores in a period, by flag. */
export interface FlagCounts {
  total: number;
  L: number;
  N: number;
  H: number;
  LL: number;
  HH: number;
}

export interface LisUsageOut {
  generatedAt: string;
  connections: {
    id: string;
    name: string;
    keyPrefix: string;
    status: "active" | "revoked";
    last24h: FlagCounts;
    last7d: FlagCounts;
    analytes: { code: string; name: string; last24h: FlagCounts; last7d: FlagCounts }[];
  }[];
}
