import { db } from "@/db/client";
import { studyDetail } from "@/db/queries/studies";
import { apiRoute } from "@/lib/api/handler";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** The study, its analyte, its uploads with their counts and the number of donor results. */
export const GET = apiRoute({ permission: "studies:write", params: studyIdParams }, async ({ params: { id } }) =>
  studyDetail(db(), { id }),
);
