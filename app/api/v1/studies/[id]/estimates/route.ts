import { db } from "@/db/client";
import { createEstimate, listEstimates } from "@/db/queries/estimates";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { createEstimateBody } from "@/lib/studies/estimate-input";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** The study's estimates in brief, newest first (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", params: studyIdParams }, async ({ params: { id } }) => {
  if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
  return { items: await listEstimates(db(), { studyId: id }) };
});

/**
 * Estimates one partition over its donor results without an exclusion in effect: the command
 * line's document (screening "propose") plus id, studyId, partition and createdAt.
 */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: createEstimateBody },
  async ({ caller, params: { id }, body }) => {
    const estimate = await createEstimate(db(), { studyId: id, input: body, actor: actorOf(caller) });
    return Response.json(estimate, {
      status: 201,
      headers: { location: `/api/v1/studies/${id}/estimates/${estimate.id}`, "cache-control": "no-store" },
    });
  },
);
