import { z } from "zod";
import { histogram, type Histogram } from "@/lib/stats/histogram";
import { normalQqPlot, type QqPlot } from "@/lib/stats/qq-plot";
import { boxCoxOfValue } from "@/lib/stats/box-cox";

/** Most points a strip chart receives: the rest is thinned in the middle, both tails kept. */
export const STRIP_MAX_POINTS = 1500;
/** Most points of a Q-Q plot. */
export const QQ_MAX_POINTS = 500;

const age = z.coerce.number("an age is a number of years.").min(0, "an age is from 0 to 130 years.").max(130, "an age is from 0 to 130 years.");

/** The partition of GET …/chart-data as query parameters: sex, ageFrom, ageTo (half-open, years). */
export const partitionQuery = z
  .object({
    sex: z.enum(["F", "M"], "sex is F or M.").optional(),
    ageFrom: age.optional(),
    ageTo: age.optional(),
  })
  .strict()
  .refine((p) => p.ageFrom === undefined || p.ageTo === undefined || p.ageFrom < p.ageTo, {
    message: "ageFrom must be below ageTo (the range is [ageFrom, ageTo)).",
    path: ["ageTo"],
  });

export type PartitionQuery = z.output<typeof partitionQuery>;

export const lookupQuery = z
  .object({
    codes: z
      .string()
      .transform((s) => [...new Set(s.split(",").map((c) => c.trim()).filter(Boolean))])
      .pipe(z.array(z.string()).min(1, "Give at least one donor code.").max(1000, "Give at most 1,000 donor codes at once.")),
  })
  .strict();

export interface StripChartData {
  n: number;
  censored: { below: number; above: number };
  points: { rank: number; value: number }[];
  thinned: boolean;
}

/** The strip chart of a partition's measured values: sorted, thinned in the middle past STRIP_MAX_POINTS. */
export function stripChartData(measured: readonly number[], censored: { below: number; above: number }): StripChartData {
  if (measured.length < 2) {
    return { n: measured.length, censored, points: measured.map((value, i) => ({ rank: i + 1, value })), thinned: false };
  }
  const qq = normalQqPlot(measured, { maxPoints: STRIP_MAX_POINTS, tailPoints: 50 });
  return { n: measured.length, censored, points: qq.points.map((p) => ({ rank: p.rank, value: p.sample })), thinned: qq.thinned };
}

export type Scale = { transform: "none" | "ln" | "box-cox"; lambda: number | null };

export interface EstimateCharts {
  histogram: Pick<Histogram, "rule" | "binWidth" | "bins" | "curve"> | null;
  qq: Pick<QqPlot, "points" | "line" | "thinned"> | null;
}

/**
 * The histogram (raw-scale bins, the normal fitted on the estimate's scale) and the normal Q-Q
 * plot on that scale, from an estimate's measured values. Null where the values cannot make one
 * (fewer than 2, all equal, or a non-positive value on a transformed scale).
 */
export function estimateCharts(measured: readonly number[], scale: Scale): EstimateCharts {
  const positive = measured.every((v) => v > 0);
  const transform = scale.transform !== "none" && !positive ? "none" : scale.transform;
  const lambda = transform === "box-cox" ? scale.lambda : null;
  const distinct = measured.length >= 2 && measured.some((v) => v !== measured[0]);
  if (!distinct || (transform === "box-cox" && lambda === null)) return { histogram: null, qq: null };
  const h = histogram(measured, { transform, lambda: lambda ?? undefined, maxBins: 60, curvePoints: 101 });
  const onScale =
    transform === "none" ? measured : measured.map((v) => boxCoxOfValue(v, transform === "ln" ? 0 : (lambda as number)));
  const qq = normalQqPlot(onScale, { maxPoints: QQ_MAX_POINTS, tailPoints: 20 });
  return {
    histogram: { rule: h.rule, binWidth: h.binWidth, bins: h.bins, curve: h.curve },
    qq: { points: qq.points, line: qq.line, thinned: qq.thinned },
  };
}
