import { db } from "@/db/client";
import { listPartitionAssessments } from "@/db/queries/partition-assessments";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** The study's partition assessments, newest first. */
export const GET = apiRoute({ permission: "studies:write", params: studyIdParams }, async ({ params: { id } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  return { items: await listPartitionAssessments(db(), { studyId: id }) };
});
