import { db } from "@/db/client";
import { requireDirectStudy } from "@/db/queries/age-curve-estimates";
import { screenStudy } from "@/db/queries/screens";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { screenBody } from "@/lib/studies/screening-input";

export const dynamic = "force-dynamic";

/** Runs an outlier screen over a partition and answers its proposals; excludes nothing. */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: screenBody },
  async ({ caller, params, body }) => {
    await requireDirectStudy(db(), { id: params.id, what: "an outlier screen of limits per partition" });
    return screenStudy(db(), { studyId: params.id, rule: body.rule, partition: body.partition, actor: actorOf(caller) });
  },
);
