/**
 * The e-mails that tell LIS connection contacts what changed in force, so that they refresh the
 * range tables their LIS keeps: "version.in_force" (a version signed off, or reinstated on a
 * withdrawal) and "version.withdrawn" (withdrawn with nothing in force after it). Pure: the words
 * only; db/queries/version-moves.ts queues them in the move's transaction.
 */
import { scopeLabel, type PartitionScope } from "./comparison";

export interface MessagePartition extends PartitionScope {
  low: number | null;
  high: number | null;
}

export interface MessageVersion {
  number: number;
  unit: string;
  decimals: number;
  criticalLow: number | null;
  criticalHigh: number | null;
}

export interface MessageAnalyte {
  code: string;
  name: string;
}

/** Where an LIS reads the partitions in force (GET, with its key). */
export const intervalsPath = (code: string) => `/api/v1/analytes/${encodeURIComponent(code)}/intervals`;

function limitsLine(p: MessagePartition, v: MessageVersion): string {
  const fixed = (x: number) => x.toFixed(v.decimals);
  // An LMS partition (age curves) has no fixed limits: they depend on the exact age.
  const limits =
    p.low === null && p.high === null
      ? `limits by exact age from LMS age curves, ${v.unit} (fetch them at the ages you need with ?ages=)`
      : p.low !== null && p.high !== null
        ? `${fixed(p.low)} to ${fixed(p.high)} ${v.unit}`
        : p.low !== null
          ? `${fixed(p.low)} and above ${v.unit}`
          : `up to ${fixed(p.high!)} ${v.unit}`;
  const everyone = p.sex === null && p.ageFromDays === null && p.ageToDays === null;
  const scope = everyone ? "All patients" : scopeLabel(p);
  const days = p.ageFromDays === null && p.ageToDays === null ? "" : ` (age in days ${p.ageFromDays ?? 0} to under ${p.ageToDays ?? "no upper bound"})`;
  return `- ${scope}${days}: ${limits}`;
}

function criticalLine(v: MessageVersion): string {
  const parts = [
    v.criticalLow !== null ? `below ${v.criticalLow.toFixed(v.decimals)}` : null,
    v.criticalHigh !== null ? `above ${v.criticalHigh.toFixed(v.decimals)}` : null,
  ].filter(Boolean);
  return parts.length ? `Critical limits (flags LL and HH): ${parts.join(", ")} ${v.unit}.` : "No critical limits are set: no value is flagged LL or HH.";
}

/**
 * "version.in_force": which version of which analyte is in force from when, its limits by
 * partition, and that the LIS range tables should be refreshed from the intervals route.
 */
export function inForceMessage({
  analyte,
  version,
  partitions,
  effectiveFrom,
  reinstatedAfter,
}: {
  analyte: MessageAnalyte;
  version: MessageVersion;
  partitions: readonly MessagePartition[];
  effectiveFrom: Date;
  /** When the version went back in force on the withdrawal of another: that version's number and the reason. */
  reinstatedAfter?: { number: number; reason: string };
}): { subject: string; text: string } {
  const how = reinstatedAfter
    ? `Version ${version.number} of ${analyte.code} (${analyte.name}) is back in force from ${effectiveFrom.toISOString()}: version ${reinstatedAfter.number} was withdrawn (reason given: ${reinstatedAfter.reason}).`
    : `Version ${version.number} of ${analyte.code} (${analyte.name}) was signed off and is in force from ${effectiveFrom.toISOString()}.`;
  return {
    subject: `Bellwether: ${analyte.code} reference interval version ${version.number} in force`,
    text:
      `${how}\n\n` +
      `Reference limits by partition (central 95%, limits inclusive):\n${partitions.map((p) => limitsLine(p, version)).join("\n")}\n\n` +
      `${criticalLine(version)}\n\n` +
      `Scores from Bellwether use these limits from that moment. Please refresh your LIS range tables for ${analyte.code} from ` +
      `GET ${intervalsPath(analyte.code)} (with your connection's key), which answers the partitions in force with their limits.\n\n` +
      `You receive this as the contact of an LIS connection to Bellwether.`,
  };
}

/** "version.withdrawn" to LIS contacts: nothing of the analyte is in force, so scoring answers an error for it. */
export function withdrawnMessage({
  analyte,
  version,
  at,
  reason,
}: {
  analyte: MessageAnalyte;
  version: Pick<MessageVersion, "number">;
  at: Date;
  reason: string;
}): { subject: string; text: string } {
  return {
    subject: `Bellwether: ${analyte.code} reference interval version ${version.number} withdrawn, none in force`,
    text:
      `Version ${version.number} of ${analyte.code} (${analyte.name}) was withdrawn from use on ${at.toISOString()} (reason given: ${reason}). ` +
      `No reference interval of ${analyte.code} is in force now.\n\n` +
      `Until a new version is signed off, Bellwether answers every ${analyte.code} item sent to POST /api/v1/scores (and to the FHIR route) with an error ` +
      `in its place, and GET ${intervalsPath(analyte.code)} answers no version and no partitions. Please take the ${analyte.code} ranges out of your LIS range tables ` +
      `or mark them as not in force, and refresh them from that route when you are told a version is in force again.\n\n` +
      `You receive this as the contact of an LIS connection to Bellwether.`,
  };
}
