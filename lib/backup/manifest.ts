/**
 * What `npm run backup` writes beside each dump (FILE.json) and `npm run restore FILE` checks:
 * the dump's SHA-256, the audit chain's head in the dump's own snapshot, and counts to compare.
 */
import { z } from "zod";

export const BACKUP_FORMAT = "bellwether.backup.v1";

const sha256 = z.string().regex(/^[0-9a-f]{64}$/);

export const backupManifestSchema = z.object({
  format: z.literal(BACKUP_FORMAT),
  createdAt: z.string(),
  /** The dump's file name (in the manifest's folder) and what its bytes hash to. */
  dumpFile: z.string().min(1),
  sizeBytes: z.number().int().nonnegative(),
  sha256,
  database: z.string().min(1),
  ownerRole: z.string().min(1),
  appRole: z.string().min(1),
  serverVersion: z.string(),
  /** The newest migration applied: its journal time, as bellwether_schema_version() gives it. */
  schemaVersion: z.string().nullable(),
  /** The newest link of the audit chain in the dump; null for an empty chain. */
  chainHead: z.object({ position: z.number().int().positive(), eventId: z.string(), hash: sha256 }).nullable(),
  counts: z.object({
    auditEvents: z.number().int().nonnegative(),
    auditChainPending: z.number().int().nonnegative(),
    signatures: z.number().int().nonnegative(),
    signedVersions: z.number().int().nonnegative(),
  }),
});

export type BackupManifest = z.infer<typeof backupManifestSchema>;

/** The manifest's path for a dump. */
export const manifestPathOf = (dumpPath: string) => `${dumpPath}.json`;
