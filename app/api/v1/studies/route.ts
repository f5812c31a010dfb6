import { db } from "@/db/client";
import { createStudy, listStudies } from "@/db/queries/studies";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { createStudyBody } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** Every study, newest first (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write" }, async () => ({ studies: await listStudies(db()) }));

/** Opens a study for an analyte (directors and scientists). */
export const POST = apiRoute({ permission: "studies:write", body: createStudyBody }, async ({ caller, body }) => {
  const study = await createStudy(db(), { input: body, actor: actorOf(caller) });
  return Response.json(
    { ...study, analyteCode: body.analyte },
    { status: 201, headers: { location: `/api/v1/studies/${study.id}`, "cache-control": "no-store" } },
  );
});
