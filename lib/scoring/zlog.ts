import normal from "@stdlib/stats-base-dists-normal";
import { assertFiniteNumber, StatsInputError } from "../stats/validate";

export interface ZlogOptions {
  /** "log" (default, Hoffmann's zlog) or "linear" (the same with the identity for ln). */
  scale?: "log" | "linear";
  /**
   * Width of the interval in z units: 3.92 as published (default), or "exact" for
   * 2·Φ⁻¹(0.975) = 3.919928 when the limits are exact 2.5th/97.5th percentiles.
   */
  width?: 3.92 | "exact";
}

function prepare(low: number, high: number, options: ZlogOptions) {
  assertFiniteNumber(low, "low limit");
  assertFiniteNumber(high, "high limit");
  const log = (options.scale ?? "log") === "log";
  if (log && !(low > 0)) {
    throw new StatsInputError(`zlog needs a positive low limit (got ${low}); use the linear scale`);
  }
  if (!(low < high)) {
    throw new StatsInputError(`the low limit (${low}) must be below the high limit (${high})`);
  }
  const width = options.width === "exact" ? 2 * normal.quantile(0.975, 0, 1) : 3.92;
  const g = log ? Math.log : (v: number) => v;
  return { log, width, gl: g(low), gh: g(high), g };
}

/**
 * zlog: a z-score for a value against an interval known only by its limits, assuming the
 * interval is the central 95% of a log-normal (or, linear scale, normal) distribution:
 * zlog = (ln x − (ln L + ln U)/2)·3.92/(ln U − ln L). The interval maps to −1.96 … +1.96.
 *
 * @see Hoffmann G, Klawonn F, Lichtinghagen R, Orth M. The zlog value as a basis for the
 *   standardization of laboratory results. J Lab Med 2017;41:23–32.
 * @param x the value (> 0 on the log scale)
 * @param low the lower reference limit (> 0 on the log scale)
 * @param high the upper reference limit (> low)
 * @param options scale and width
 * @returns zlog and its percentile 100·Φ(zlog)
 * @throws StatsInputError for non-finite input, low ≥ high, or a value or limit ≤ 0 on the
 *   log scale
 * Complexity: O(1).
 * @example
 * zlog(34, 35, 52); // → { z: -2.2470, percentile: 1.23 }
 */
export function zlog(
  x: number,
  low: number,
  high: number,
  options: ZlogOptions = {},
): { z: number; percentile: number } {
  const { log, width, gl, gh, g } = prepare(low, high, options);
  assertFiniteNumber(x, "value");
  if (log && !(x > 0)) throw new StatsInputError(`value = ${x} is not positive; zlog needs values > 0`);
  const z = ((g(x) - (gl + gh) / 2) * width) / (gh - gl);
  return { z, percentile: 100 * normal.cdf(z, 0, 1) };
}

/**
 * Inverse zlog: the value at a given zlog, x = L^(0.5 − z/3.92)·U^(0.5 + z/3.92) on the log
 * scale (the linear scale likewise with the identity).
 *
 * @see Hoffmann G, Klawonn F, Lichtinghagen R, Orth M. J Lab Med 2017;41:23–32.
 * @param z the zlog value
 * @param low the lower reference limit (> 0 on the log scale)
 * @param high the upper reference limit (> low)
 * @param options scale and width, as for {@link zlog}
 * @throws StatsInputError for non-finite input, low ≥ high, or a limit ≤ 0 on the log scale
 * Complexity: O(1).
 * @example
 * zlogInverse(-1.96, 35, 52); // → 35
 */
export function zlogInverse(z: number, low: number, high: number, options: ZlogOptions = {}): number {
  const { log, width, gl, gh } = prepare(low, high, options);
  assertFiniteNumber(z, "zlog");
  const y = (gl + gh) / 2 + (z * (gh - gl)) / width;
  return log ? Math.exp(y) : y;
}
