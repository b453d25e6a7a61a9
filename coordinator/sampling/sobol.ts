// Sobol' low-discrepancy points in [0, 1)^d for quasi-Monte Carlo designs (the Saltelli design is built on them).
// Direction numbers: Joe & Kuo, "Constructing Sobol sequences with better two-dimensional projections",
// SIAM J. Sci. Comput. 30(5), 2008, file new-joe-kuo-6.21201 (rows for dimensions 2–32). Pure: no I/O.

/**
 * Rows of the published table for dimensions 2..32: [s, a, m_1, …, m_s], where s is the degree of the primitive
 * polynomial, a encodes its inner coefficients and m_k are the initial direction integers (Joe & Kuo 2008).
 */
const JOE_KUO_ROWS: ReadonlyArray<readonly number[]> = [
  [1, 0, 1],
  [2, 1, 1, 3],
  [3, 1, 1, 3, 1],
  [3, 2, 1, 1, 1],
  [4, 1, 1, 1, 3, 3],
  [4, 4, 1, 3, 5, 13],
  [5, 2, 1, 1, 5, 5, 17],
  [5, 4, 1, 1, 5, 5, 5],
  [5, 7, 1, 1, 7, 11, 19],
  [5, 11, 1, 1, 5, 1, 1],
  [5, 13, 1, 1, 1, 3, 11],
  [5, 14, 1, 3, 5, 5, 31],
  [6, 1, 1, 3, 3, 9, 7, 49],
  [6, 13, 1, 1, 1, 15, 21, 21],
  [6, 16, 1, 3, 1, 13, 27, 49],
  [6, 19, 1, 1, 1, 15, 7, 5],
  [6, 22, 1, 3, 1, 15, 13, 25],
  [6, 25, 1, 1, 5, 5, 19, 61],
  [7, 1, 1, 3, 7, 11, 23, 15, 103],
  [7, 4, 1, 3, 7, 13, 13, 15, 69],
  [7, 7, 1, 1, 3, 13, 7, 35, 63],
  [7, 8, 1, 3, 5, 9, 1, 25, 53],
  [7, 14, 1, 3, 1, 13, 9, 35, 107],
  [7, 19, 1, 3, 1, 5, 27, 61, 31],
  [7, 21, 1, 1, 5, 11, 19, 41, 61],
  [7, 28, 1, 3, 5, 3, 3, 13, 69],
  [7, 31, 1, 1, 7, 13, 1, 19, 1],
  [7, 32, 1, 3, 7, 5, 13, 19, 59],
  [7, 37, 1, 1, 3, 9, 25, 29, 41],
  [7, 41, 1, 3, 5, 13, 23, 1, 55],
  [7, 42, 1, 3, 7, 3, 13, 59, 17],
];

/** Bits per coordinate: points are multiples of 2^-32, so at most 2^32 points are distinct. */
const BITS = 32;

/** Highest dimension this table supports. */
export const SOBOL_MAX_DIMENSION = JOE_KUO_ROWS.length + 1;

/** Direction numbers v_k (left-aligned in 32 bits) for one dimension, 0-based `dimension`. */
function directionNumbers(dimension: number): Uint32Array {
  const v = new Uint32Array(BITS);
  if (dimension === 0) {
    // First dimension: the van der Corput sequence in base 2, v_k = 2^(32−k) (Joe & Kuo 2008, §2).
    for (let k = 0; k < BITS; k++) v[k] = 2 ** (BITS - 1 - k);
    return v;
  }
  const row = JOE_KUO_ROWS[dimension - 1];
  const s = row[0];
  const a = row[1];
  for (let k = 0; k < s && k < BITS; k++) v[k] = (row[2 + k] * 2 ** (BITS - 1 - k)) >>> 0;
  for (let k = s; k < BITS; k++) {
    // Bratley–Fox recurrence as stated by Joe & Kuo (2008, eq. 2.2):
    // v_k = a_1 v_{k−1} ⊕ … ⊕ a_{s−1} v_{k−s+1} ⊕ v_{k−s} ⊕ (v_{k−s} >> s).
    let x = (v[k - s] ^ (v[k - s] >>> s)) >>> 0;
    for (let j = 1; j < s; j++) {
      if ((a >>> (s - 1 - j)) & 1) x = (x ^ v[k - j]) >>> 0;
    }
    v[k] = x;
  }
  return v;
}

/** Index (from 0) of the lowest zero bit of i: which direction number changes between Gray-code neighbours. */
function lowestZeroBit(i: number): number {
  let c = 0;
  while (i & 1) {
    i >>>= 1;
    c++;
  }
  return c;
}

/**
 * The first `skip + count` points of the d-dimensional Sobol' sequence in Gray-code order (Antonov & Saleev 1979,
 * as in Joe & Kuo's generator), returning the last `count` of them. The first point is the origin.
 * `digitalShift` (one 32-bit word per dimension) XORs every coordinate, a random digital shift that keeps the
 * net properties (Owen, "Monte Carlo theory, methods and examples", 2013, ch. 17; from memory).
 */
export function sobolPoints(
  count: number,
  dimensions: number,
  skip = 0,
  digitalShift?: ArrayLike<number>,
): Float64Array[] {
  if (!Number.isInteger(dimensions) || dimensions < 1 || dimensions > SOBOL_MAX_DIMENSION) {
    throw new Error(`sobolPoints: dimensions must be an integer in [1, ${SOBOL_MAX_DIMENSION}] (got ${dimensions})`);
  }
  if (!Number.isInteger(count) || count < 0) throw new Error(`sobolPoints: count must be a non-negative integer (got ${count})`);
  if (!Number.isInteger(skip) || skip < 0) throw new Error(`sobolPoints: skip must be a non-negative integer (got ${skip})`);
  if (skip + count > 2 ** BITS) throw new Error('sobolPoints: at most 2^32 points');
  if (digitalShift && digitalShift.length < dimensions) throw new Error('sobolPoints: one shift word per dimension');
  const v = Array.from({ length: dimensions }, (_, j) => directionNumbers(j));
  const x = new Uint32Array(dimensions);
  const scale = 2 ** -BITS;
  const out: Float64Array[] = [];
  const emit = () => {
    const p = new Float64Array(dimensions);
    for (let j = 0; j < dimensions; j++) {
      const word = digitalShift ? (x[j] ^ digitalShift[j]) >>> 0 : x[j];
      p[j] = word * scale;
    }
    out.push(p);
  };
  // Point 0 is the origin; point i+1 = point i ⊕ v_{c(i)}, c(i) the lowest zero bit of i (Gray-code order).
  if (skip === 0 && count > 0) emit();
  for (let i = 0; i + 1 < skip + count; i++) {
    const c = lowestZeroBit(i);
    for (let j = 0; j < dimensions; j++) x[j] = (x[j] ^ v[j][c]) >>> 0;
    if (i + 1 >= skip) emit();
  }
  return out;
}
