import { db } from "@/db/client";
import { findStudy } from "@/db/queries/studies";
import { donorResultsByCode } from "@/db/queries/study-charts";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { lookupQuery } from "@/lib/studies/chart-data";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** The study's donor results with the donor codes given (`codes=A1,A2`), and the codes it does not hold. */
export const GET = apiRoute(
  { permission: "donors:read", params: studyIdParams, query: lookupQuery },
  async ({ params: { id }, query: { codes } }) => {
    if (!(await findStudy(db(), { id }))) throw new AppError("not_found", `There is no study with the id ${id}.`);
    const items = await donorResultsByCode(db(), { studyId: id, codes });
    const found = new Set(items.map((i) => i.donorCode));
    return { items, missing: codes.filter((c) => !found.has(c)) };
  },
);
