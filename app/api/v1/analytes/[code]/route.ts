import { z } from "zod";
import { db } from "@/db/client";
import { findAnalyteByCode, updateAnalyte } from "@/db/queries/analytes";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { analyteCodeSchema, updateAnalyteBody } from "@/lib/analytes/input";
import { actorOf } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

const params = z.object({ code: analyteCodeSchema });

export const GET = apiRoute({ permission: "intervals:read", params, lisKey: true }, async ({ params: { code } }) => {
  const analyte = await findAnalyteByCode(db(), { code });
  if (!analyte) throw new AppError("not_found", `There is no analyte with the code ${code}.`);
  return analyte;
});

/** A partial change; the code itself never changes (scientists and directors). */
export const PATCH = apiRoute(
  { permission: "analytes:write", params, body: updateAnalyteBody },
  async ({ caller, params: { code }, body }) => updateAnalyte(db(), { code, changes: body, actor: actorOf(caller) }),
);
