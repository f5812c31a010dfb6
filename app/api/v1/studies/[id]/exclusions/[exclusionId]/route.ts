import { db } from "@/db/client";
import { undoExclusion } from "@/db/queries/exclusions";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { exclusionIdParams } from "@/lib/studies/screening-input";

export const dynamic = "force-dynamic";

/** Undoes an exclusion (and the outlier decision that made it) while the study is open. */
export const DELETE = apiRoute({ permission: "studies:write", params: exclusionIdParams }, async ({ caller, params }) =>
  undoExclusion(db(), { studyId: params.id, exclusionId: params.exclusionId, actor: actorOf(caller) }),
);
