/**
 * Input checks shared by every statistics function. Each throws a {@link StatsInputError}
 * whose message names the argument and says what was wrong, so a caller (route handler,
 * server action, command line) can show it to a person as it is.
 */
export class StatsInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "StatsInputError";
  }
}

/** Throws unless `x` holds at least `min` values, all finite numbers. */
export function assertFiniteSample(x: readonly number[], name = "values", min = 1): void {
  if (!Array.isArray(x)) throw new StatsInputError(`${name} must be an array of numbers`);
  if (x.length < min) {
    throw new StatsInputError(
      min === 1 ? `${name} is empty` : `${name} needs at least ${min} values (got ${x.length})`,
    );
  }
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new StatsInputError(`${name}[${i}] is not a finite number (${String(v)})`);
    }
  }
}

/** Throws unless every value is strictly positive (needed for ln and Box-Cox). */
export function assertPositiveSample(x: readonly number[], name = "values"): void {
  assertFiniteSample(x, name);
  for (let i = 0; i < x.length; i++) {
    if (x[i] <= 0) {
      throw new StatsInputError(
        `${name}[${i}] = ${x[i]} is not positive; a log or Box-Cox transform needs values > 0`,
      );
    }
  }
}

/** Throws unless 0 < p < 1. */
export function assertOpenProbability(p: number, name = "p"): void {
  if (typeof p !== "number" || !Number.isFinite(p) || p <= 0 || p >= 1) {
    throw new StatsInputError(`${name} must be a number strictly between 0 and 1 (got ${String(p)})`);
  }
}

/** Throws unless `v` is a finite number. */
export function assertFiniteNumber(v: number, name = "value"): void {
  if (typeof v !== "number" || !Number.isFinite(v)) {
    throw new StatsInputError(`${name} must be a finite number (got ${String(v)})`);
  }
}
