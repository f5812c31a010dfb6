import { z } from "zod";

/** The seed of an estimate's random parts (bootstrap, restart checks): a 32-bit integer, 1 by default. Stored with the estimate. */
export const seedField = z
  .number("seed is a whole number.")
  .int("seed is a whole number.")
  .min(-2147483648, "seed fits in 32 bits (−2147483648 to 2147483647).")
  .max(2147483647, "seed fits in 32 bits (−2147483648 to 2147483647).")
  .default(1);
