import { db } from "@/db/client";
import { createAnalyte, listAnalytes } from "@/db/queries/analytes";
import { apiRoute } from "@/lib/api/handler";
import { createAnalyteBody } from "@/lib/analytes/input";
import { actorOf } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

/** The analyte catalogue, for everyone signed in and for LIS keys. */
export const GET = apiRoute({ permission: "intervals:read", lisKey: true }, async () => ({ analytes: await listAnalytes(db()) }));

/** Adds an analyte (scientists and directors). */
export const POST = apiRoute({ permission: "analytes:write", body: createAnalyteBody }, async ({ caller, body }) => {
  const analyte = await createAnalyte(db(), { input: body, actor: actorOf(caller) });
  return Response.json(analyte, {
    status: 201,
    headers: { location: `/api/v1/analytes/${analyte.code}`, "cache-control": "no-store" },
  });
});
