// The solver's version policy, enforced: results of a fixed set of small cases (every kernel path, and the sphere)
// are recorded for the current major version in test/fixtures/solver-results.json. A change that moves any
// receiver's phasor by more than round-off must bump the major version in solver/version.ts (the major is part of
// every job id, so ledgers then recompute instead of mixing old and new numbers), and record the new values:
//   LOAMWAVE_RECORD_SOLVER_RESULTS=1 npx vitest run test/solver.version-policy.test.ts
// Round-off-only changes (a reordered sum) stay within the tolerance and keep the major (DEVELOPERS.md, "Solver
// versions").
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { fingerprintCases } from '../bench/bench-cases.js';
import { parseCase, type Case } from '../schemas/case.js';
import { solve } from '../solver/index.js';
import { SOLVER_MAJOR } from '../solver/version.js';
import { PROJECT_ROOT } from './helpers/compiled.js';

interface Recorded {
  solver_major: string;
  cases: Record<string, { steps: number; receivers: Array<{ ez: [number, number]; e_horizontal: [number, number]; h: [number, number] }> }>;
}

const FIXTURE = join(PROJECT_ROOT, 'test', 'fixtures', 'solver-results.json');

/** The bench's small cases (each kernel path) and a small sphere with a mixed path and a raised receiver. */
function policyCases(): Array<[string, Case]> {
  return [
    ...fingerprintCases(),
    [
      'spherical mixed path (moist ground, sea from 40 km), dispersion correction',
      parseCase({
        geometry: 'spherical',
        frequency_hz: 20_000,
        ground: {
          model: 'impedance',
          segments: [
            { start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 },
            { start_m: 40_000, conductivity_s_per_m: 5, relative_permittivity: 70 },
          ],
        },
        domain: { range_m: 80_000, height_m: 20_000 },
        grid: { cells_per_wavelength: 10, absorbing_cells: 10, dispersion_correction: 'along_ground' },
        receivers: { ranges_m: [30_000, 60_000], height_m: 200 },
      }),
    ],
  ];
}

function solveAll(): Recorded {
  const cases: Recorded['cases'] = {};
  for (const [name, c] of policyCases()) {
    const r = solve(c);
    cases[name] = {
      steps: r.grid.steps,
      receivers: r.receivers.map((x) => ({ ez: [x.ez.re, x.ez.im], e_horizontal: [x.e_horizontal.re, x.e_horizontal.im], h: [x.h.re, x.h.im] })),
    };
  }
  return { solver_major: SOLVER_MAJOR, cases };
}

/** |a − b| / |b| of two complex numbers given as [re, im]; 0 when both are 0. */
const relDiff = (a: [number, number], b: [number, number]) => {
  const d = Math.hypot(a[0] - b[0], a[1] - b[1]);
  const m = Math.hypot(b[0], b[1]);
  return m === 0 ? d : d / m;
};

// Round-off class: double-precision sums of ~1e5 terms reordered differ by ~1e-12 relative (Higham, Accuracy and
// Stability of Numerical Algorithms, 2002, §4.2); 1e-9 leaves room and is still a thousandth of a millidecibel.
const ROUND_OFF = 1e-9;

describe('solver version policy', () => {
  const now = solveAll();
  if (process.env.LOAMWAVE_RECORD_SOLVER_RESULTS === '1') writeFileSync(FIXTURE, JSON.stringify(now, null, 1) + '\n');
  const recorded = JSON.parse(readFileSync(FIXTURE, 'utf8')) as Recorded;

  it('when the recorded results belong to another major version then they must be recorded again', () => {
    expect(recorded.solver_major, 'record the results of this major version (see the head of this file)').toBe(SOLVER_MAJOR);
  });

  it.each(Object.keys(recorded.cases))('when "%s" is solved then every phasor matches the recorded one to round-off, or the major version was bumped', (name) => {
    const was = recorded.cases[name];
    const is = now.cases[name];
    expect(is, `case "${name}" is no longer solved; record again`).toBeDefined();
    const hint = 'results changed beyond round-off: bump the major version in solver/version.ts and record again';
    expect(is.steps, hint).toBe(was.steps);
    expect(is.receivers).toHaveLength(was.receivers.length);
    was.receivers.forEach((w, i) => {
      for (const k of ['ez', 'e_horizontal', 'h'] as const) expect(relDiff(is.receivers[i][k], w[k]), `${hint} (receiver ${i}, ${k})`).toBeLessThanOrEqual(ROUND_OFF);
    });
  });
});
