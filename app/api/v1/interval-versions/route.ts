import { db } from "@/db/client";
import { createIntervalVersion, listIntervalVersions } from "@/db/queries/interval-versions";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { createVersionBody, listVersionsQuery } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Interval versions, filtered by `analyte` (code) and `state` (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", query: listVersionsQuery }, async ({ query }) => ({
  items: await listIntervalVersions(db(), { query }),
}));

/** Drafts an interval version from a study's estimates, one method per partition. */
export const POST = apiRoute({ permission: "studies:write", body: createVersionBody }, async ({ caller, body }) => {
  const version = await createIntervalVersion(db(), { input: body, actor: actorOf(caller) });
  return Response.json(version, {
    status: 201,
    headers: { location: `/api/v1/interval-versions/${version.id}`, "cache-control": "no-store" },
  });
});
