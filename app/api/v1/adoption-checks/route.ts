import { db } from "@/db/client";
import { createAdoptionCheck, listAdoptionChecks } from "@/db/queries/adoption-checks";
import { createAdoptionCheckBody, listAdoptionChecksQuery } from "@/lib/adoption/input";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

/** Adoption checks, newest first, filtered by `analyte` (code) and `decision` (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", query: listAdoptionChecksQuery }, async ({ query }) => ({
  items: await listAdoptionChecks(db(), { query }),
}));

/** Checks an external interval against 20 local healthy-donor values (CLSI EP28-A3c). */
export const POST = apiRoute({ permission: "studies:write", body: createAdoptionCheckBody }, async ({ caller, body }) => {
  const check = await createAdoptionCheck(db(), { input: body, actor: actorOf(caller) });
  return Response.json(check, {
    status: 201,
    headers: { location: `/api/v1/adoption-checks/${check.id}`, "cache-control": "no-store" },
  });
});
