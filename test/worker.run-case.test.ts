// Running one case: the solver's numbers come back unchanged with the job id and wall time, every way a case can
// fail becomes a typed failure with the right retry decision, and results are checked to survive JSON exactly.
import { describe, expect, it } from 'vitest';
import { parseCase, type CaseInput } from '../schemas/case.js';
import { solve } from '../solver/index.js';
import { CaseFailure } from '../worker/case-failure.js';
import { findJsonHazard } from '../worker/json-safe.js';
import { runCase, type RunCaseOptions } from '../worker/run-case.js';

/** The small fast case of the agreed interface: 20 kHz, 8 cells per wavelength, 60 km × 20 km. */
const small: CaseInput = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 8 },
  receivers: { ranges_m: [10000, 30000, 50000] },
};

/** Every number of a value with its path, for exact comparison (Object.is tells -0 from 0 and NaN from itself). */
function numbersOf(v: unknown, path = ''): Array<[string, number]> {
  if (typeof v === 'number') return [[path, v]];
  if (v && typeof v === 'object') return Object.entries(v).flatMap(([k, x]) => numbersOf(x, `${path}.${k}`));
  return [];
}

function failureOf(input: unknown, opts: RunCaseOptions = {}): CaseFailure {
  try {
    runCase(input, 'job-under-test', opts);
  } catch (e) {
    expect(e).toBeInstanceOf(CaseFailure);
    return e as CaseFailure;
  }
  throw new Error('expected runCase to fail');
}

describe('runCase', () => {
  it('when the case is valid then it returns the solver result unchanged plus the job id and a wall time', () => {
    const r = runCase(small, 'job-1');
    const direct = solve(parseCase(small));
    const { job_id, wall_time_s, ...solved } = r;
    expect(job_id).toBe('job-1');
    expect(wall_time_s).toBeGreaterThan(0);
    // Determinism is a contract of the solver: the same case gives bit-identical numbers.
    const got = numbersOf(solved);
    const want = numbersOf(direct);
    expect(got.length).toBe(want.length);
    for (let i = 0; i < want.length; i++) expect(Object.is(got[i][1], want[i][1]), got[i][0]).toBe(true);
  });

  it('when a result goes through JSON then every double reads back bit for bit', () => {
    // ECMA-262 (2023) §6.1.6.1.20 Number::toString: the shortest decimal that reads back as the same double, so
    // JSON.parse(JSON.stringify(x)) === x for every finite double except -0 (RFC 8259 has no -0 distinction).
    const r = runCase(small, 'job-1');
    const back = JSON.parse(JSON.stringify(r));
    const a = numbersOf(r);
    const b = numbersOf(back);
    expect(b.length).toBe(a.length);
    for (let i = 0; i < a.length; i++) expect(Object.is(a[i][1], b[i][1]), a[i][0]).toBe(true);
  });

  it.each<[string, unknown, RunCaseOptions, string, boolean, string]>([
    ['an invalid case', { ...small, frequency_hz: -5 }, {}, 'invalid_case', false, 'frequency_hz: must be >= 100'],
    ['a case larger than the memory cap', small, { maxMemoryBytes: 1000 }, 'too_large', false, 'MiB allowed per case'],
    // Loss tangent σ/(ωε0εr) = 1e-5/(2π·3e5·8.854e-12·15) ≈ 0.04 < 1: outside the surface-impedance model.
    [
      'an impedance ground outside the model',
      { ...small, frequency_hz: 300000, ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 1e-5, relative_permittivity: 15 }] } },
      {},
      'invalid_case',
      false,
      'loss tangent',
    ],
    // The solver polls for a stop every 256 steps; 24 cells per wavelength gives several hundred steps.
    ['a stop request', { ...small, grid: { cells_per_wavelength: 24 } }, { shouldStop: () => true }, 'cancelled', true, 'stopped on request'],
  ])('when it is %s then the failure has the expected kind (%#)', (_what, input, opts, kind, retryable, text) => {
    const f = failureOf(input, opts);
    expect(f.kind).toBe(kind);
    expect(f.retryable).toBe(retryable);
    expect(f.reason).toContain(text);
    expect(f.reason).not.toContain('\n');
  });

  it('when a failure crosses a thread or queue boundary as its wire form then kind and message survive', () => {
    const f = new CaseFailure('diverged', 'ez went to Infinity');
    expect(CaseFailure.fromWire(JSON.parse(JSON.stringify(f.toWire())))).toMatchObject({ kind: 'diverged', message: 'ez went to Infinity' });
    expect(CaseFailure.fromWire({ kind: 'nonsense' }).kind).toBe('internal');
  });
});

describe('findJsonHazard', () => {
  // RFC 8259 (2017) §6: "Numeric values that cannot be represented in the grammar below (such as Infinity and
  // NaN) are not permitted"; JSON.stringify writes them as null, and typed arrays become index-keyed objects.
  it.each<[string, unknown, string | undefined]>([
    ['plain data', { a: [1, 2.5, 'x', true, null], b: { c: -3 } }, undefined],
    ['NaN deep inside', { receivers: [{ ez: { re: 1 } }, { ez: { re: Number.NaN } }] }, 'receivers[1].ez.re is NaN'],
    ['Infinity', { x: Infinity }, 'x is Infinity'],
    ['-Infinity', [0, -Infinity], '[1] is -Infinity'],
    ['a typed array', { samples: new Float64Array(2) }, 'samples is a Float64Array'],
    ['a BigInt', { n: 10n }, 'n is a bigint'],
  ])('when the value holds %s then the hazard is named', (_what, value, expected) => {
    const h = findJsonHazard(value);
    if (expected === undefined) expect(h).toBeUndefined();
    else expect(h).toContain(expected);
  });
});
