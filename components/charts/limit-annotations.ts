import type { AnnotationOptions } from "chartjs-plugin-annotation";
import { CHART_COLORS } from "./palette";

export interface ChartLimits {
  lower: number | null;
  upper: number | null;
  lowerCi: readonly [number, number] | null;
  upperCi: readonly [number, number] | null;
}

/**
 * The reference limits as labelled teal lines and their 90% CIs as labelled translucent bands,
 * on the x axis (histogram, strip chart) or the y axis.
 */
export function limitAnnotations(
  limits: ChartLimits,
  format: (v: number) => string,
  axis: "x" | "y" = "x",
): Record<string, AnnotationOptions> {
  const out: Record<string, AnnotationOptions> = {};
  const scaleKey = axis === "x" ? "xScaleID" : "yScaleID";
  for (const side of ["lower", "upper"] as const) {
    const ci = side === "lower" ? limits.lowerCi : limits.upperCi;
    const value = limits[side];
    if (ci) {
      out[`${side}Ci`] = {
        type: "box",
        [scaleKey]: axis,
        ...(axis === "x" ? { xMin: ci[0], xMax: ci[1] } : { yMin: ci[0], yMax: ci[1] }),
        backgroundColor: CHART_COLORS.ciBand,
        borderColor: CHART_COLORS.ciBorder,
        borderWidth: 1,
        label: {
          display: true,
          content: "90% CI",
          position: axis === "x" ? { x: "center", y: "end" } : { x: "start", y: "center" },
          color: CHART_COLORS.fit,
          font: { size: 10 },
        },
      } as AnnotationOptions;
    }
    if (value !== null) {
      out[side] = {
        type: "line",
        [scaleKey]: axis,
        ...(axis === "x" ? { xMin: value, xMax: value } : { yMin: value, yMax: value }),
        borderColor: CHART_COLORS.limit,
        borderWidth: 2,
        label: {
          display: true,
          content: `${side === "lower" ? "Lower" : "Upper"} ${format(value)}`,
          position: "end",
          backgroundColor: CHART_COLORS.limit,
          color: "#ffffff",
          font: { size: 11, weight: "bold" },
          padding: 3,
        },
      } as AnnotationOptions;
    }
  }
  return out;
}
