import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { intervalsParams as params, intervalsQuery as query } from "@/lib/scores/schemas";
import { inForceIntervals } from "@/lib/scores/score-items";
import { referenceRangeOf } from "@/lib/scoring/fhir";

export const dynamic = "force-dynamic";

/**
 * The in-force partitions of an analyte, by our code or its LOINC code, from the model cache (no
 * database work: an LIS key is answered even while the database is away); each partition also as
 * a FHIR R4 Observation.referenceRange element, and `referenceRange` beside them the list an
 * Observation would carry (FHIR reads several ranges as "or"). With `?ages=` each partition
 * lists its limits at the requested ages it covers: LMS age curves read at each exact age, each
 * also as a referenceRange whose `age` is that age; in the list, those replace the curves' text
 * element.
 */
export const GET = apiRoute({ permission: "intervals:read", lisKey: true, params, query }, async ({ params: { code }, query: { ages } }) => {
  const intervals = await inForceIntervals(code, { ages });
  if (!intervals) throw new AppError("not_found", `There is no analyte with the code ${code}.`);
  const decimals = intervals.analyte.decimals;
  const ranges: ReturnType<typeof referenceRangeOf>[] = [];
  const partitions = intervals.partitions.map((p) => {
    const referenceRange = referenceRangeOf({ ...p, decimals });
    const atAges = p.atAges?.map((a) => ({
      ...a,
      referenceRange: p.curves
        ? referenceRangeOf({ low: a.low, high: a.high, unit: p.unit, decimals, sex: p.sex, atAge: a.ageYears })
        : referenceRange,
    }));
    if (p.curves && atAges) ranges.push(...atAges.map((a) => a.referenceRange));
    else ranges.push(referenceRange);
    return atAges ? { ...p, referenceRange, atAges } : { ...p, referenceRange };
  });
  return { ...intervals, partitions, referenceRange: ranges };
});
