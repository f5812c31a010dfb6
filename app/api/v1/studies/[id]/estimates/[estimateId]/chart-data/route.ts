import { db } from "@/db/client";
import { isLmsEstimate } from "@/db/queries/age-curve-estimates";
import { isIndirectEstimate } from "@/db/queries/indirect-estimates";
import { findStudy } from "@/db/queries/studies";
import { estimateValues } from "@/db/queries/study-charts";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { estimateCharts, type Scale } from "@/lib/studies/chart-data";
import { estimateIdParams, partitionOut } from "@/lib/studies/estimate-input";

export const dynamic = "force-dynamic";

/**
 * The charts of one estimate, computed from the values it was made from: histogram counts with
 * the density fitted on its parametric scale, and the normal Q-Q points on that scale. Binned
 * counts and thinned Q-Q points, not the raw values.
 */
export const GET = apiRoute({ permission: "donors:read", params: estimateIdParams }, async ({ params: { id, estimateId } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  const { estimate, measured, censored } = await estimateValues(db(), { studyId: id, estimateId });
  if (isLmsEstimate(estimate)) {
    throw new AppError("conflict", `The estimate ${estimateId} holds LMS age curves, not limits: its chart and diagnostics are at …/estimates/${estimateId}/age-curves.`);
  }
  if (isIndirectEstimate(estimate)) {
    throw new AppError("conflict", `The estimate ${estimateId} is an indirect estimate: its chart (the histogram with the fitted non-diseased part) is the histogram field of …/estimates/${estimateId}.`);
  }
  const parametric = (estimate.document.parametric ?? {}) as { transform?: Scale["transform"]; lambda?: number | null };
  const scale: Scale = { transform: parametric.transform ?? "none", lambda: parametric.lambda ?? null };
  return { estimateId, partition: partitionOut(estimate), n: measured.length, censored, scale, ...estimateCharts(measured, scale) };
});
