/**
 * The project's one seeded random source: uniform, Gaussian and integer draws, reproducible from
 * an integer seed on every platform.
 *
 * Generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number generators",
 * ACM Transactions on Mathematical Software 47(4), 2021, §4 and Fig. 4 of the 32-bit variant —
 * figure number from memory), 128 bits of state, period 2¹²⁸ − 1, one 32-bit word per step:
 *   result = rotl(s1·5, 7)·9;  t = s1 ≪ 9;  s2 ^= s0; s3 ^= s1; s1 ^= s2; s0 ^= s3; s2 ^= t;
 *   s3 = rotl(s3, 11).
 * Seeding: the four state words are the two halves of the first two outputs of SplitMix64
 * (Steele, Lea & Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014, the
 * `mix64` finaliser with increment 0x9e3779b97f4a7c15), so nearby seeds give unrelated streams.
 * uniform(): (a ≫ 5)·2²⁶ + (b ≫ 6) over 2⁵³ from two words, a double in [0, 1) with 53 random bits.
 * normal(): Marsaglia polar method (Marsaglia & Bray, "A convenient method for generating normal
 * variables", SIAM Review 6(3), 1964): draw u, v uniform on (−1, 1) until 0 < s = u² + v² < 1,
 * return u·√(−2 ln s / s) and keep v·√(−2 ln s / s) for the next call.
 * int(n): uniform on {0, …, n−1} by rejection of the top partial block of 2³² (unbiased), for
 * 1 ≤ n ≤ 2³².
 * Cost O(1) per draw; no allocation after creation.
 *
 * @example
 *   const rng = createRng(7);
 *   rng.uniform(); // in [0, 1); the same sequence for every run with seed 7
 *                  // (asserted in test/linalg/random.test.ts)
 */

export interface Rng {
  /** Uniform on [0, 1). */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
  /** Uniform integer in {0, …, n − 1}, 1 ≤ n ≤ 2³². */
  int(n: number): number;
  /** The next raw 32-bit output as an unsigned integer. */
  nextUint32(): number;
}

const MASK64 = (1n << 64n) - 1n;

/** SplitMix64 step: returns [next state, output] (Steele, Lea & Flood 2014). */
export function splitMix64(state: bigint): [bigint, bigint] {
  const next = (state + 0x9e3779b97f4a7c15n) & MASK64;
  let z = next;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  z = z ^ (z >> 31n);
  return [next, z];
}

class Xoshiro128StarStar implements Rng {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare = 0;
  private hasSpare = false;

  constructor(seed: number) {
    let st = BigInt.asUintN(64, BigInt(seed));
    const [st1, a] = splitMix64(st);
    st = st1;
    const [, b] = splitMix64(st);
    this.s0 = Number(a & 0xffffffffn) | 0;
    this.s1 = Number(a >> 32n) | 0;
    this.s2 = Number(b & 0xffffffffn) | 0;
    this.s3 = Number(b >> 32n) | 0;
    // The all-zero state is the generator's one fixed point; SplitMix64 never yields it for
    // two consecutive outputs, but guard anyway.
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  nextUint32(): number {
    const s1 = this.s1;
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9);
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = (this.s3 << 11) | (this.s3 >>> 21);
    return result >>> 0;
  }

  uniform(): number {
    const a = this.nextUint32() >>> 5;
    const b = this.nextUint32() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }

  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let u: number;
    let v: number;
    let s: number;
    do {
      u = 2 * this.uniform() - 1;
      v = 2 * this.uniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * f;
    this.hasSpare = true;
    return u * f;
  }

  int(n: number): number {
    if (!Number.isInteger(n) || n < 1 || n > 4294967296) throw new RangeError(`int: n must be an integer in [1, 2^32], got ${n}`);
    const limit = 4294967296 - (4294967296 % n);
    let x: number;
    do x = this.nextUint32();
    while (x >= limit);
    return x % n;
  }
}

/** A new generator from an integer seed (any safe integer; negative seeds are taken mod 2⁶⁴). */
export function createRng(seed: number): Rng {
  if (!Number.isSafeInteger(seed)) throw new RangeError(`createRng: seed must be a safe integer, got ${seed}`);
  return new Xoshiro128StarStar(seed);
}
