import { db } from "@/db/client";
import { findStudy } from "@/db/queries/studies";
import { partitionValues } from "@/db/queries/study-charts";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { partitionQuery, stripChartData } from "@/lib/studies/chart-data";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/**
 * The strip chart of one partition as it stands (exclusions in effect left out): its measured
 * values in rank order, thinned in the middle past 1,500 points, and its censored counts.
 */
export const GET = apiRoute(
  { permission: "donors:read", params: studyIdParams, query: partitionQuery },
  async ({ params: { id }, query }) => {
    if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
    const partition = { ...(query.sex ? { sex: query.sex } : {}), ...(query.ageFrom !== undefined ? { ageFrom: query.ageFrom } : {}), ...(query.ageTo !== undefined ? { ageTo: query.ageTo } : {}) };
    const values = await partitionValues(db(), { studyId: id, partition });
    return { partition, ...stripChartData(values.measured, values.censored) };
  },
);
