import { db } from "@/db/client";
import { submitIntervalVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Submits a draft for sign-off (directors and scientists); 409 unless it is a draft. */
export const POST = apiRoute({ permission: "studies:write", params: versionIdParams }, async ({ caller, sessionId, params: { id } }) =>
  submitIntervalVersion(db(), { id, caller: { id: caller.id, email: caller.email, sessionId } }),
);
