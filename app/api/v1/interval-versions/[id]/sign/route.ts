import { db } from "@/db/client";
import { signIntervalVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { signVersionBody, versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/**
 * Signs a version off: an electronic signature (password; e-mail too at the session's first
 * signature). 403 for a role, a duty rule, a wrong password or a locked account; 409 for a state.
 */
export const POST = apiRoute(
  { permission: "versions:sign", params: versionIdParams, body: signVersionBody },
  async ({ caller, sessionId, params: { id }, body }) =>
    signIntervalVersion(db(), { id, credentials: { password: body.password, email: body.email }, caller: { id: caller.id, email: caller.email, sessionId } }),
);
