import { z } from "zod";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { inForceIntervals } from "@/lib/scores/score-items";

export const dynamic = "force-dynamic";

const params = z.object({ code: z.string().trim().min(1).max(32) });

/**
 * The in-force partitions of an analyte, by our code or its LOINC code, from the model cache (no
 * database work: an LIS key is answered even while the database is away).
 */
export const GET = apiRoute({ permission: "intervals:read", lisKey: true, params }, async ({ params: { code } }) => {
  const intervals = await inForceIntervals(code);
  if (!intervals) throw new AppError("not_found", `There is no analyte with the code ${code}.`);
  return intervals;
});
