import { db } from "@/db/client";
import { requireDirectStudy } from "@/db/queries/age-curve-estimates";
import { createOutlierDecision, listOutlierDecisions } from "@/db/queries/outlier-decisions";
import { screenEvidenceOf } from "@/db/queries/screens";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { listAllQuery, outlierDecisionBody } from "@/lib/studies/screening-input";

export const dynamic = "force-dynamic";

/** The study's outlier decisions in effect (`all=true`: the undone ones too), newest first. */
export const GET = apiRoute(
  { permission: "studies:write", params: studyIdParams, query: listAllQuery },
  async ({ params: { id }, query }) => {
    if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
    return { items: await listOutlierDecisions(db(), { studyId: id, all: query.all }) };
  },
);

/** Confirms ("exclude") or rejects ("keep") an outlier proposal, with a reason. */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: outlierDecisionBody },
  async ({ caller, params: { id }, body }) => {
    await requireDirectStudy(db(), { id, what: "a decision on an outlier proposal" });
    const { rule, evidence } = await screenEvidenceOf(db(), { studyId: id, donorResultId: body.donorResultId, rule: body.rule, partition: body.partition });
    const decision = await createOutlierDecision(db(), {
      studyId: id,
      donorResultId: body.donorResultId,
      decision: body.decision,
      rule,
      reason: body.reason,
      evidence,
      actor: actorOf(caller),
    });
    return Response.json(decision, {
      status: 201,
      headers: { location: `/api/v1/studies/${id}/outlier-decisions/${decision.id}`, "cache-control": "no-store" },
    });
  },
);
