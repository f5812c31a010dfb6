import { db } from "@/db/client";
import { assertDirectStudy, createLmsEstimate } from "@/db/queries/age-curve-estimates";
import { createEstimate, listEstimates } from "@/db/queries/estimates";
import { createIndirectEstimate } from "@/db/queries/indirect-estimates";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { estimateRequestBody } from "@/lib/studies/estimate-input";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** The study's estimates in brief, newest first (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", params: studyIdParams }, async ({ params: { id } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  return { items: await listEstimates(db(), { studyId: id }) };
});

/**
 * Estimates one partition over its donor results without an exclusion in effect: the command
 * line's document (screening "propose") plus id, studyId, partition and createdAt. For an
 * age-curve study, `{method: "lms", sex?, seed?}` fits the LMS curves instead (the document of
 * lib/studies/age-curves.ts); for an indirect study, `{method: "indirect", cleaning?, partition?,
 * seed?}` cleans the routine results and estimates by truncated maximum likelihood (the document
 * of lib/studies/indirect-estimates.ts). Each kind of study refuses the others' requests with 409.
 */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: estimateRequestBody },
  async ({ caller, params: { id }, body }) => {
    const actor = actorOf(caller);
    let estimate: { id: string };
    if (body.kind === "lms") {
      estimate = await createLmsEstimate(db(), { studyId: id, input: body.input, actor });
    } else if (body.kind === "indirect") {
      estimate = await createIndirectEstimate(db(), { studyId: id, input: body.input, actor });
    } else {
      const study = await findStudy(db(), { id });
      if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
      assertDirectStudy(study, "an estimate of limits per partition");
      estimate = await createEstimate(db(), { studyId: id, input: body.input, actor });
    }
    return Response.json(estimate, {
      status: 201,
      headers: { location: `/api/v1/studies/${id}/estimates/${estimate.id}`, "cache-control": "no-store" },
    });
  },
);
