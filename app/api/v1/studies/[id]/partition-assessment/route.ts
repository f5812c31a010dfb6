import { db } from "@/db/client";
import { requireDirectStudy } from "@/db/queries/age-curve-estimates";
import { createPartitionAssessment } from "@/db/queries/partition-assessments";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { partitionAssessmentBody } from "@/lib/studies/partition-input";

export const dynamic = "force-dynamic";

/** Harris-Boyd and Lahti for sex or age bands over the included donor results; kept. */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: partitionAssessmentBody },
  async ({ caller, params: { id }, body }) => {
    await requireDirectStudy(db(), { id, what: "a partition assessment by sex or age band" });
    const assessment = await createPartitionAssessment(db(), { studyId: id, input: body, actor: actorOf(caller) });
    return Response.json(assessment, { status: 201, headers: { "cache-control": "no-store" } });
  },
);
