/**
 * What a signature on an interval version covers, written so that anyone can recompute it: the
 * RFC 8785 JSON Canonicalization Scheme (JCS) serialisation of the analyte's code and unit, the
 * version's number, each partition's scope, limits, 90% CIs, method, n and full scoring model
 * (an empirical model with its reference values), the critical limits and the SHA-256 of the
 * uploads the estimates were computed from; and the SHA-256 of that text's UTF-8 bytes.
 *
 * JCS through the `canonicalize` package (by an author of RFC 8785): keys sorted by UTF-16 code
 * units, numbers as ECMAScript writes them, no whitespace. Recompute a signature's hash with
 * `printf '%s' "$CANONICAL_CONTENT" | sha256sum`.
 */
import { createHash } from "node:crypto";
import canonicalize from "canonicalize";

/** Names the layout of the content, so that a later layout can never be mistaken for this one. */
export const CANONICAL_CONTENT_FORMAT = "bellwether.interval-version.v1";

export interface CanonicalPartition {
  position: number;
  sex: "F" | "M" | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCi: readonly [number, number] | null;
  highCi: readonly [number, number] | null;
  method: string;
  n: number;
  /** The model as stored (lib/scoring/model.ts), values included. */
  model: unknown;
}

export interface CanonicalVersion {
  analyte: { code: string; unit: string };
  number: number;
  criticalLow: number | null;
  criticalHigh: number | null;
  partitions: readonly CanonicalPartition[];
  /** SHA-256 (hex) of the uploads behind the partitions' estimates; order does not matter. */
  uploadSha256: readonly string[];
}

export function sha256Hex(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}

/** The JCS text of a version and its SHA-256. Throws on a non-finite number (JCS has none). */
export function canonicalContentOf(version: CanonicalVersion): { text: string; sha256: string } {
  const content = {
    format: CANONICAL_CONTENT_FORMAT,
    analyte: { code: version.analyte.code, unit: version.analyte.unit },
    number: version.number,
    criticalLow: version.criticalLow,
    criticalHigh: version.criticalHigh,
    partitions: [...version.partitions]
      .sort((a, b) => a.position - b.position)
      .map((p) => ({
        position: p.position,
        sex: p.sex,
        ageFromDays: p.ageFromDays,
        ageToDays: p.ageToDays,
        low: p.low,
        high: p.high,
        lowCi: p.lowCi ? [p.lowCi[0], p.lowCi[1]] : null,
        highCi: p.highCi ? [p.highCi[0], p.highCi[1]] : null,
        method: p.method,
        n: p.n,
        model: p.model,
      })),
    uploadSha256: [...new Set(version.uploadSha256)].sort(),
  };
  const text = canonicalize(content);
  if (text === undefined) throw new Error("The version's content has no JSON form.");
  return { text, sha256: sha256Hex(text) };
}
