import { z } from "zod";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { inForceIntervals } from "@/lib/scores/score-items";
import { referenceRangeOf } from "@/lib/scoring/fhir";

export const dynamic = "force-dynamic";

const params = z.object({ code: z.string().trim().min(1).max(32) });

/**
 * The in-force partitions of an analyte, by our code or its LOINC code, from the model cache (no
 * database work: an LIS key is answered even while the database is away); each partition also as
 * a FHIR R4 Observation.referenceRange element, and `referenceRange` beside them the list an
 * Observation would carry (FHIR reads several ranges as "or").
 */
export const GET = apiRoute({ permission: "intervals:read", lisKey: true, params }, async ({ params: { code } }) => {
  const intervals = await inForceIntervals(code);
  if (!intervals) throw new AppError("not_found", `There is no analyte with the code ${code}.`);
  const partitions = intervals.partitions.map((p) => ({ ...p, referenceRange: referenceRangeOf({ ...p, decimals: intervals.analyte.decimals }) }));
  return { ...intervals, partitions, referenceRange: partitions.map((p) => p.referenceRange) };
});
