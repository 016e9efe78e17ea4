/**
 * Seeded uniform random numbers for the engine (sample paths, Monte Carlo estimates).
 *
 * Generator: xoshiro128** (Blackman and Vigna, "Scrambled linear pseudorandom number generators",
 * ACM TOMS 47(4), 2021), a 128-bit-state generator with 32-bit output, period 2^128 − 1. Its state
 * is filled from the seed with SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom
 * number generators", OOPSLA 2014), the seeding its authors recommend. Everything is integer
 * arithmetic (Math.imul, shifts, BigInt for the one-off seeding), so a seed gives the same
 * sequence on every platform and JavaScript engine.
 */

import type { UniformSource } from "./types";

const MASK64 = (1n << 64n) - 1n;
const GOLDEN_GAMMA = 0x9e3779b97f4a7c15n;

/** One SplitMix64 step on a 64-bit state; returns [new state, output]. O(1). */
function splitMix64(state: bigint): [bigint, bigint] {
  const next = (state + GOLDEN_GAMMA) & MASK64;
  let z = next;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return [next, z ^ (z >> 31n)];
}

/**
 * The first `count` SplitMix64 outputs from `seed` (reduced modulo 2^64, so negative integers
 * are read in two's complement). O(count). Throws RangeError if the seed is not a safe integer.
 */
export function splitMix64Sequence(seed: number, count: number): bigint[] {
  assertSeed(seed);
  let state = BigInt.asUintN(64, BigInt(seed));
  const out: bigint[] = [];
  for (let i = 0; i < count; i++) {
    const [s, z] = splitMix64(state);
    state = s;
    out.push(z);
  }
  return out;
}

function assertSeed(seed: number): void {
  if (!Number.isSafeInteger(seed)) {
    throw new RangeError(`seed must be a safe integer (|seed| ≤ 2^53 − 1), got ${String(seed)}`);
  }
}

/** xoshiro128** with a 53-bit-resolution uniform `next()`. */
export class Xoshiro128StarStar implements UniformSource {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  /** Seeds the state from two SplitMix64 outputs. O(1). Throws RangeError for a non-safe-integer seed. */
  constructor(seed: number) {
    // SplitMix64's output function is a bijection and successive inputs differ, so two
    // consecutive outputs are never both 0: the all-zero state (a fixed point) cannot occur.
    const [a, b] = splitMix64Sequence(seed, 2);
    this.s0 = Number(a & 0xffffffffn) | 0;
    this.s1 = Number(a >> 32n) | 0;
    this.s2 = Number(b & 0xffffffffn) | 0;
    this.s3 = Number(b >> 32n) | 0;
  }

  /** The next 32-bit output as an unsigned integer in [0, 2^32). O(1). Never throws. */
  nextUint32(): number {
    const s1 = this.s1;
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /**
   * A uniform number in [0, 1) with 53-bit resolution: the top 27 and 26 bits of two consecutive
   * outputs form k / 2^53 (the construction of the MT19937 reference code's genrand_res53). O(1).
   */
  next(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/**
 * A seeded uniform source: xoshiro128** seeded by SplitMix64, `next()` in [0, 1) with 53-bit
 * resolution (each call consumes two 32-bit outputs). Same seed, same sequence, on every platform.
 * O(1) per draw. Throws RangeError if the seed is not a safe integer.
 */
export function createRng(seed: number): UniformSource {
  return new Xoshiro128StarStar(seed);
}
