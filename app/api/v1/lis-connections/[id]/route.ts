import { db } from "@/db/client";
import { getLisConnection, updateLisConnection } from "@/db/queries/lis-connections";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { lisConnectionParams, updateLisConnectionBody } from "@/lib/lis/input";
import { lisRuntime } from "@/lib/lis/runtime";

export const dynamic = "force-dynamic";

export const GET = apiRoute({ permission: "users:manage", params: lisConnectionParams }, async ({ params: { id } }) => getLisConnection(db(), { id }));

/** Renames a connection, changes its contact e-mail or its rate limit (what the body names). */
export const PATCH = apiRoute(
  { permission: "users:manage", params: lisConnectionParams, body: updateLisConnectionBody },
  async ({ caller, params: { id }, body }) => {
    const connection = await updateLisConnection(db(), { id, changes: body, actor: actorOf(caller) });
    // This instance applies a new rate limit before answering; the others on the notification.
    await lisRuntime().keys.reload().catch(() => undefined);
    return connection;
  },
);
