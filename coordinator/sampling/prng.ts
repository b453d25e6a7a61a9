// Seeded pseudo-random numbers shared by Latin hypercube sampling, bootstrap resampling and the sweep expansion:
// xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number generators", ACM TOMS 47(4), 2021),
// seeded through SplitMix64 as its authors recommend. Pure and deterministic: no clock, no global state.

/** A seeded stream of pseudo-random numbers; every call advances the stream. */
export interface Prng {
  /** Next 32-bit unsigned integer. */
  nextUint32(): number;
  /** Next float, uniform in [0, 1), with 32 random bits. */
  nextFloat(): number;
  /** Next integer, uniform in [0, n), for 1 <= n <= 2^32 (rejection sampling: no modulo bias). */
  nextInt(n: number): number;
  /** The current state words, to resume or to test against reference vectors. */
  state(): [number, number, number, number];
}

const TWO_POW_32 = 4294967296;

function rotl32(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** A xoshiro128** generator started from four state words (not all zero). */
export function xoshiro128StarStarFromState(words: readonly [number, number, number, number]): Prng {
  let s0 = words[0] >>> 0;
  let s1 = words[1] >>> 0;
  let s2 = words[2] >>> 0;
  let s3 = words[3] >>> 0;
  if ((s0 | s1 | s2 | s3) === 0) throw new Error('xoshiro128** state must not be all zero');
  const nextUint32 = (): number => {
    // result = rotl(s1·5, 7)·9; then the linear engine step (Blackman & Vigna 2021, xoshiro128** listing).
    const result = Math.imul(rotl32(Math.imul(s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (s1 << 9) >>> 0;
    s2 = (s2 ^ s0) >>> 0;
    s3 = (s3 ^ s1) >>> 0;
    s1 = (s1 ^ s2) >>> 0;
    s0 = (s0 ^ s3) >>> 0;
    s2 = (s2 ^ t) >>> 0;
    s3 = rotl32(s3, 11);
    return result;
  };
  return {
    nextUint32,
    nextFloat: () => nextUint32() / TWO_POW_32,
    nextInt: (n: number) => {
      if (!(Number.isInteger(n) && n >= 1 && n <= TWO_POW_32)) throw new Error(`nextInt: n must be an integer in [1, 2^32] (got ${n})`);
      // Reject the top partial block so every residue is equally likely (common practice).
      const limit = TWO_POW_32 - (TWO_POW_32 % n);
      for (;;) {
        const u = nextUint32();
        if (u < limit) return u % n;
      }
    },
    state: () => [s0, s1, s2, s3],
  };
}

/** SplitMix64 outputs (Steele, Lea & Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014). */
export function splitMix64(seed: bigint, count: number): bigint[] {
  const mask = (1n << 64n) - 1n;
  let x = seed & mask;
  const out: bigint[] = [];
  for (let i = 0; i < count; i++) {
    // z = (x += golden gamma); two xor-shift-multiply rounds; final xor-shift (Steele et al. 2014, mix64 variant 13).
    x = (x + 0x9e3779b97f4a7c15n) & mask;
    let z = x;
    z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & mask;
    z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & mask;
    out.push(z ^ (z >> 31n));
  }
  return out;
}

/** A xoshiro128** generator from an integer seed: the state is two SplitMix64 outputs split into 32-bit words. */
export function createPrng(seed: number): Prng {
  if (!Number.isSafeInteger(seed)) throw new Error(`createPrng: seed must be a safe integer (got ${seed})`);
  const [a, b] = splitMix64(BigInt.asUintN(64, BigInt(seed)), 2);
  const lo = (v: bigint) => Number(v & 0xffffffffn);
  const hi = (v: bigint) => Number(v >> 32n);
  return xoshiro128StarStarFromState([lo(a), hi(a), lo(b), hi(b)]);
}

/** Fisher–Yates shuffle in place (Knuth, TAOCP vol. 2, Algorithm 3.4.2 P), driven by `rng`. */
export function shuffleInPlace<T>(items: T[], rng: Prng): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = rng.nextInt(i + 1);
    const tmp = items[i];
    items[i] = items[j];
    items[j] = tmp;
  }
  return items;
}
