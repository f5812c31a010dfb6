import { db } from "@/db/client";
import { createExclusions, listExclusions } from "@/db/queries/exclusions";
import { findStudy } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { exclusionsBody, listAllQuery } from "@/lib/studies/screening-input";

export const dynamic = "force-dynamic";

/** The study's exclusions in effect (`all=true`: the undone ones too), newest first. */
export const GET = apiRoute(
  { permission: "studies:write", params: studyIdParams, query: listAllQuery },
  async ({ params: { id }, query }) => {
    if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
    return { items: await listExclusions(db(), { studyId: id, all: query.all }) };
  },
);

/** Excludes donor results by hand, with a reason: all of them or none. */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, body: exclusionsBody },
  async ({ caller, params: { id }, body }) => {
    const items = await createExclusions(db(), { studyId: id, donorResultIds: body.donorResultIds, reason: body.reason, actor: actorOf(caller) });
    return Response.json({ items }, { status: 201, headers: { "cache-control": "no-store" } });
  },
);
