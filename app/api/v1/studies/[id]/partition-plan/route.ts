import { db } from "@/db/client";
import { requireDirectStudy } from "@/db/queries/age-curve-estimates";
import { setPartitionPlan } from "@/db/queries/studies";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { partitionPlanBody } from "@/lib/studies/partition-input";
import { partitionsOfPlan } from "@/lib/studies/partitions";

export const dynamic = "force-dynamic";

/** Stores the partitions the scientist chose and answers the partitions the plan yields. */
export const PUT = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: partitionPlanBody },
  async ({ caller, params: { id }, body }) => {
    await requireDirectStudy(db(), { id, what: "a partition plan" });
    const study = await setPartitionPlan(db(), { id, plan: body, actor: actorOf(caller) });
    return { partitionPlan: study.partitionPlan, partitions: partitionsOfPlan(study.partitionPlan) };
  },
);
