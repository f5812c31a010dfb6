import { db } from "@/db/client";
import { undoOutlierDecision } from "@/db/queries/outlier-decisions";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { decisionIdParams } from "@/lib/studies/screening-input";

export const dynamic = "force-dynamic";

/** Undoes an outlier decision and, for "exclude", its exclusion, while the study is open. */
export const DELETE = apiRoute({ permission: "studies:write", params: decisionIdParams }, async ({ caller, params }) => {
  const { id, undoneAt, exclusionId } = await undoOutlierDecision(db(), {
    studyId: params.id,
    decisionId: params.decisionId,
    actor: actorOf(caller),
  });
  return { id, undoneAt, exclusionId };
});
