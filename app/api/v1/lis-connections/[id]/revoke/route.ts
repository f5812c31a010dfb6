import { db } from "@/db/client";
import { revokeLisConnection } from "@/db/queries/lis-connections";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { lisConnectionParams } from "@/lib/lis/input";
import { lisRuntime } from "@/lib/lis/runtime";

export const dynamic = "force-dynamic";

/**
 * Revokes the connection's key for good. This instance refuses the key before answering; every
 * other instance as soon as the `bellwether_lis_connections` notification reaches it.
 */
export const POST = apiRoute({ permission: "users:manage", params: lisConnectionParams }, async ({ caller, params: { id } }) => {
  const connection = await revokeLisConnection(db(), { id, actor: actorOf(caller) });
  await lisRuntime().keys.reload().catch(() => undefined);
  return connection;
});
