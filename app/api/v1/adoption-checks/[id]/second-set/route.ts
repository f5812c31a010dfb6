import { db } from "@/db/client";
import { recordSecondSet } from "@/db/queries/adoption-checks";
import { adoptionCheckIdParams, secondSetBody } from "@/lib/adoption/input";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

/** The second set of 20 values, for a check whose first set called for it; 409 otherwise. */
export const POST = apiRoute(
  { permission: "studies:write", params: adoptionCheckIdParams, body: secondSetBody },
  async ({ caller, params: { id }, body }) => recordSecondSet(db(), { id, values: body.values, actor: actorOf(caller) }),
);
