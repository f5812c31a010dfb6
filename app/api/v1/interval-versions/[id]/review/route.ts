import { db } from "@/db/client";
import { reviewIntervalVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { reviewVersionBody, versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Signs a review of a version in force ("reviewed_still_valid"), which sets its next review-by date. */
export const POST = apiRoute(
  { permission: "versions:sign", params: versionIdParams, body: reviewVersionBody },
  async ({ caller, sessionId, params: { id }, body }) =>
    reviewIntervalVersion(db(), {
      id,
      comment: body.comment,
      credentials: { password: body.password, email: body.email },
      caller: { id: caller.id, email: caller.email, sessionId },
    }),
);
