import { db } from "@/db/client";
import { ageCurveChartData } from "@/db/queries/age-curve-estimates";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { estimateIdParams } from "@/lib/studies/estimate-input";

export const dynamic = "force-dynamic";

/**
 * The chart and diagnostics of an LMS estimate (directors and scientists): the 2.5th, 50th and
 * 97.5th centile curves, the donors it was fitted to as points with their z, the donors beyond
 * 4 SD, and the coverage and Q-Q by age group. 409 for an estimate of limits.
 */
export const GET = apiRoute({ permission: "donors:read", params: estimateIdParams }, async ({ params: { id, estimateId } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  return ageCurveChartData(db(), { studyId: id, estimateId });
});
