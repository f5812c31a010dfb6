import { db } from "@/db/client";
import { createLisConnection, listLisConnections } from "@/db/queries/lis-connections";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { createLisConnectionBody } from "@/lib/lis/input";
import { generateLisKey } from "@/lib/lis/keys";

export const dynamic = "force-dynamic";

/** Every LIS connection, active ones first (administrators). Keys are never listed, only prefixes. */
export const GET = apiRoute({ permission: "users:manage" }, async () => ({ connections: await listLisConnections(db()) }));

/** Creates a connection with a new key, answered this once in `key`; only its hash is stored. */
export const POST = apiRoute({ permission: "users:manage", body: createLisConnectionBody }, async ({ caller, body }) => {
  const issued = generateLisKey();
  const connection = await createLisConnection(db(), { input: body, issued, actor: actorOf(caller) });
  return Response.json(
    { ...connection, key: issued.key },
    { status: 201, headers: { location: `/api/v1/lis-connections/${connection.id}`, "cache-control": "no-store" } },
  );
});
