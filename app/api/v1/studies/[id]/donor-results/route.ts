import { db } from "@/db/client";
import { listDonorResults } from "@/db/queries/donor-results";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { donorResultsQuery } from "@/lib/studies/donor-results-query";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** A page of the study's donor results (directors and scientists: donor-level data). */
export const GET = apiRoute(
  { permission: "donors:read", params: studyIdParams, query: donorResultsQuery },
  async ({ params: { id }, query }) => {
    if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
    return listDonorResults(db(), { studyId: id, query });
  },
);
