import { db } from "@/db/client";
import { returnIntervalVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { returnVersionBody, versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Returns a version awaiting sign-off to draft with a comment (a director who did not draft or submit it). */
export const POST = apiRoute(
  { permission: "versions:sign", params: versionIdParams, body: returnVersionBody },
  async ({ caller, sessionId, params: { id }, body }) =>
    returnIntervalVersion(db(), { id, comment: body.comment, caller: { id: caller.id, email: caller.email, sessionId } }),
);
