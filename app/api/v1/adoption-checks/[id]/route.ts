import { db } from "@/db/client";
import { findAdoptionCheck } from "@/db/queries/adoption-checks";
import { adoptionCheckIdParams } from "@/lib/adoption/input";
import { apiRoute } from "@/lib/api/handler";

export const dynamic = "force-dynamic";

/** One adoption check with its values, decision and reasoning (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", params: adoptionCheckIdParams }, async ({ params: { id } }) =>
  findAdoptionCheck(db(), { id }),
);
