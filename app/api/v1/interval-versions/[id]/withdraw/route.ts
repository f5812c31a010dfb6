import { db } from "@/db/client";
import { withdrawIntervalVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { versionIdParams, withdrawVersionBody } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Withdraws a version in force (signed, with a reason), optionally reinstating the previous one. */
export const POST = apiRoute(
  { permission: "versions:sign", params: versionIdParams, body: withdrawVersionBody },
  async ({ caller, sessionId, params: { id }, body }) =>
    withdrawIntervalVersion(db(), {
      id,
      reason: body.reason,
      reinstatePrevious: body.reinstatePrevious,
      credentials: { password: body.password, email: body.email },
      caller: { id: caller.id, email: caller.email, sessionId },
    }),
);
