import { db } from "@/db/client";
import { findEstimate } from "@/db/queries/estimates";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { estimateIdParams } from "@/lib/studies/estimate-input";

export const dynamic = "force-dynamic";

/** One stored estimate document plus id, studyId, partition and createdAt. */
export const GET = apiRoute({ permission: "studies:write", params: estimateIdParams }, async ({ params: { id, estimateId } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  return findEstimate(db(), { studyId: id, estimateId });
});
