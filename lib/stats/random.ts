/**
 * A small seeded pseudo-random generator for resampling. Every bootstrap in Bellwether draws
 * from one of these, and the seed is stored with the estimate, so each number on a signed
 * interval version can be reproduced exactly.
 */
import { assertFiniteNumber, StatsInputError } from "./validate";

export interface Random {
  /** The next 32-bit output as an unsigned integer. */
  nextUint32(): number;
  /** A uniform double in [0, 1) with 32 random bits. */
  nextFloat(): number;
  /** A uniform integer in [0, bound), without modulo bias. */
  nextInt(bound: number): number;
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/**
 * xoshiro128** generator started from an explicit 128-bit state (four 32-bit words, not all
 * zero). Use {@link createRandom} to start from a seed.
 * @see Blackman D, Vigna S. Scrambled linear pseudorandom number generators. ACM Trans Math
 *   Softw 2021;47(4):36 (preprint 2018).
 * Complexity O(1) per draw; period 2^128 − 1.
 * Throws StatsInputError when the state is not four integers or is all zero.
 * @example xoshiro128ss([1, 2, 3, 4]).nextUint32() // 11520
 */
export function xoshiro128ss(state: readonly [number, number, number, number]): Random {
  if (state.length !== 4 || state.some((w) => !Number.isInteger(w))) {
    throw new StatsInputError("the generator state must be four integers");
  }
  let s0 = state[0] >>> 0;
  let s1 = state[1] >>> 0;
  let s2 = state[2] >>> 0;
  let s3 = state[3] >>> 0;
  if ((s0 | s1 | s2 | s3) === 0) throw new StatsInputError("the generator state must not be all zero");
  const nextUint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };
  const nextInt = (bound: number): number => {
    if (!Number.isInteger(bound) || bound < 1 || bound > 0x100000000) {
      throw new StatsInputError(`bound must be an integer from 1 to 2^32 (got ${bound})`);
    }
    // Rejection of the incomplete last block removes the modulo bias.
    const limit = 0x100000000 - (0x100000000 % bound);
    for (;;) {
      const u = nextUint32();
      if (u < limit) return u % bound;
    }
  };
  return { nextUint32, nextFloat: () => nextUint32() / 0x100000000, nextInt };
}

/** SplitMix32-style finaliser: spreads one seed over the 128 bits of state. */
function mix32(z: number): number {
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

/**
 * A seeded xoshiro128** generator. The seed (any safe integer) is expanded into the state by
 * a 32-bit avalanche finaliser applied to successive Weyl-sequence values.
 * @see Blackman D, Vigna S. ACM Trans Math Softw 2021;47(4):36; Steele GL, Lea D, Flood CH.
 *   Fast splittable pseudorandom number generators. OOPSLA 2014 (SplitMix seeding).
 * Complexity O(1).
 * Throws StatsInputError when the seed is not a safe integer.
 * @example createRandom(1).nextInt(6) // a number from 0 to 5, the same on every run
 */
export function createRandom(seed: number): Random {
  assertFiniteNumber(seed, "seed");
  if (!Number.isSafeInteger(seed)) throw new StatsInputError(`seed must be an integer (got ${seed})`);
  const lo = seed >>> 0;
  const hi = Math.floor(seed / 0x100000000) >>> 0;
  let w = (lo ^ Math.imul(hi, 0x27d4eb2d)) >>> 0;
  const words: number[] = [];
  for (let i = 0; i < 4; i++) {
    w = (w + 0x9e3779b9) >>> 0;
    words.push(mix32(w));
  }
  if ((words[0] | words[1] | words[2] | words[3]) === 0) words[0] = 1;
  return xoshiro128ss(words as [number, number, number, number]);
}
