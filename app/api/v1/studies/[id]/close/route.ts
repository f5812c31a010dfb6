import { db } from "@/db/client";
import { closeStudy } from "@/db/queries/studies";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** Closes the study: no more data can be changed; pending uploads are cancelled with it. */
export const POST = apiRoute({ permission: "studies:write", params: studyIdParams }, async ({ caller, params: { id } }) =>
  closeStudy(db(), { id, actor: actorOf(caller) }),
);
