// Expanding a sweep into jobs: order, generated values, designs, duplicates and job identity.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { jobIdFor, jobIdText } from '../coordinator/sweep/job-id.js';
import { countDesignPoints, expandSweep, expandSweepDetailed, listValues } from '../coordinator/sweep/expand.js';
import { parseSweep } from '../coordinator/sweep/file.js';

const base = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 8 },
  receivers: { ranges_m: [10000, 30000] },
};
const sweepOf = (extra: Record<string, unknown>) => parseSweep({ name: 'expand-test', base, ...extra }, 'sweep.yaml');
const SIGMA = 'ground.segments[0].conductivity_s_per_m';

describe('full factorial expansion', () => {
  it('when two paths vary then jobs nest like loops, the first path outermost', () => {
    // Order of nested loops / a Cartesian product with the last factor fastest (common practice).
    const jobs = expandSweep(sweepOf({ vary: { frequency_hz: { values: [20000, 30000] }, [SIGMA]: { values: [0.001, 0.01, 0.1] } } }));
    expect(jobs.map((j) => [j.params.frequency_hz, j.params[SIGMA]])).toEqual([
      [20000, 0.001], [20000, 0.01], [20000, 0.1], [30000, 0.001], [30000, 0.01], [30000, 0.1],
    ]);
    expect(jobs.map((j) => j.index)).toEqual([0, 1, 2, 3, 4, 5]);
    for (const j of jobs) {
      expect(j.case.frequency_hz).toBe(j.params.frequency_hz);
      expect(j.case.ground.segments?.[0].conductivity_s_per_m).toBe(j.params[SIGMA]);
      expect(j.case).toEqual(parseCase(j.case));
      expect(j.design).toBeUndefined();
    }
  });

  it('when the same sweep is expanded twice then ids and order are identical', () => {
    const s = sweepOf({ vary: { frequency_hz: { linear: { from: 10000, to: 30000, count: 5 } } } });
    expect(expandSweep(s).map((j) => j.job_id)).toEqual(expandSweep(s).map((j) => j.job_id));
  });

  it.each([
    // Arithmetic progression a_i = from + i·(to − from)/(count − 1); geometric a_i = from·(to/from)^(i/(count − 1)).
    [{ linear: { from: 10000, to: 30000, count: 5 } }, [10000, 15000, 20000, 25000, 30000]],
    [{ log: { from: 0.001, to: 1, count: 4 } }, [0.001, 0.01, 0.1, 1]],
    [{ values: [3, 1, 2] }, [3, 1, 2]],
  ])('when a list generator is %j then its values are %j (to 1e-15 relative, ends exact)', (g, expected) => {
    const got = listValues(g as never) as number[];
    expect(got.length).toBe(expected.length);
    got.forEach((v, i) => expect(Math.abs(v - expected[i]) / expected[i]).toBeLessThan(1e-15));
    expect(got[0]).toBe(expected[0]);
    expect(got[got.length - 1]).toBe(expected[expected.length - 1]);
  });

  it('when two design points give the same case then they collapse into one job and are counted', () => {
    // 20000 Hz given explicitly and as the base's value: both points are one case.
    const e = expandSweepDetailed(sweepOf({ vary: { frequency_hz: { values: [20000, 30000, 20000] } } }));
    expect(e.points).toBe(3);
    expect(e.jobs.length).toBe(2);
    expect(e.duplicates).toEqual([{ point: 2, job_index: 0, job_id: e.jobs[0].job_id }]);
  });

  it('when flat and spherical geometries are set against earth radii then the flat case runs once, the sphere once per radius', () => {
    const e = expandSweepDetailed(
      sweepOf({ vary: { geometry: { values: ['axisymmetric', 'spherical'] }, 'earth.radius_m': { values: [6_371_000, 8_494_667] } } }),
    );
    expect(e.points).toBe(4);
    expect(e.jobs.map((j) => [j.case.geometry, j.case.earth?.radius_m])).toEqual([
      ['axisymmetric', undefined],
      ['spherical', 6_371_000],
      ['spherical', 8_494_667],
    ]);
    expect(e.duplicates).toEqual([{ point: 1, job_index: 0, job_id: e.jobs[0].job_id }]);
    expect(e.jobs.map((j) => j.params['earth.radius_m'])).toEqual([undefined, 6_371_000, 8_494_667]);
    // The flat job is the same job as the flat base case without any earth block.
    expect(e.jobs[0].job_id).toBe(jobIdFor(parseCase({ ...base, geometry: 'axisymmetric' })));
  });

  it('when an expanded case breaks the case schema then the error names the job, its values and the field', () => {
    const s = sweepOf({ vary: { 'domain.range_m': { values: [60000, 20000] } } });
    let msg = '';
    try {
      expandSweep(s, 'sweep.yaml');
    } catch (e) {
      expect(e).toBeInstanceOf(UserError);
      msg = (e as Error).message;
    }
    expect(msg).toContain('sweep.yaml: job 1 (domain.range_m=20000): receivers.ranges_m[1]: must be inside the domain');
  });

  it('when nothing varies then the sweep is the base case as one job', () => {
    const s = sweepOf({});
    expect(countDesignPoints(s)).toBe(1);
    expect(expandSweep(s).map((j) => j.params)).toEqual([{}]);
  });
});

describe('sampled designs', () => {
  const ranges = {
    frequency_hz: { uniform: { from: 10000, to: 30000 } },
    [SIGMA]: { log_uniform: { from: 1e-4, to: 1e-2 } },
    'ground.segments[0].relative_permittivity': { uniform: { from: 5, to: 40 } },
  };

  it('when a Latin hypercube is drawn then every parameter has one sample in each of the n strata', () => {
    // Defining property of Latin hypercube sampling (McKay, Beckman & Conover, Technometrics 21(2), 1979).
    const n = 16;
    const jobs = expandSweep(sweepOf({ design: { kind: 'latin_hypercube', samples: n, seed: 7 }, vary: ranges }));
    expect(jobs.length).toBe(n);
    const stratum = {
      frequency_hz: (v: number) => Math.floor(((v - 10000) / 20000) * n),
      [SIGMA]: (v: number) => Math.floor((Math.log(v / 1e-4) / Math.log(100)) * n),
      'ground.segments[0].relative_permittivity': (v: number) => Math.floor(((v - 5) / 35) * n),
    };
    for (const [path, toStratum] of Object.entries(stratum)) {
      const strata = jobs.map((j) => toStratum(j.params[path] as number)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, i) => i));
    }
    expect(jobs.map((j) => j.design)).toEqual(jobs.map((_, i) => ({ role: 'LHS', sample: i })));
  });

  it('when the seed changes then the Latin hypercube changes, and the same seed repeats it', () => {
    const ids = (seed: number) => expandSweep(sweepOf({ design: { kind: 'latin_hypercube', samples: 4, seed }, vary: ranges })).map((j) => j.job_id);
    expect(ids(1)).toEqual(ids(1));
    expect(ids(2)).not.toEqual(ids(1));
  });

  it('when a Saltelli design is drawn then it has N·(d + 2) jobs and each AB_i is A with column i from B', () => {
    // Construction of A, B and A_B^i: Saltelli et al., Comput. Phys. Commun. 181(2), 2010, §3; cost N·(d + 2).
    const n = 4;
    const paths = Object.keys(ranges);
    const jobs = expandSweep(sweepOf({ design: { kind: 'saltelli', samples: n, seed: 3 }, vary: ranges }));
    expect(jobs.length).toBe(n * (paths.length + 2));
    const find = (role: string, sample: number) => jobs.find((j) => j.design?.role === role && j.design.sample === sample)!;
    for (let s = 0; s < n; s++) {
      const a = find('A', s);
      const b = find('B', s);
      paths.forEach((p, i) => {
        const ab = find(`AB_${i}`, s);
        paths.forEach((q, k) => expect(ab.params[q]).toBe(k === i ? b.params[q] : a.params[q]));
      });
    }
    for (const j of jobs) {
      expect(j.params.frequency_hz as number).toBeGreaterThanOrEqual(10000);
      expect(j.params.frequency_hz as number).toBeLessThan(30000);
      expect(j.params[SIGMA] as number).toBeGreaterThanOrEqual(1e-4);
      expect(j.params[SIGMA] as number).toBeLessThan(1e-2);
    }
  });
});

describe('job identity', () => {
  const c = parseCase(base);

  it('when a case is hashed then the id is the SHA-256 hex of its canonical text', () => {
    // SHA-256 of "abc" (FIPS 180-2, Appendix B.1) confirms the digest used, then the id is that digest of jobIdText.
    expect(createHash('sha256').update('abc').digest('hex')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(jobIdFor(c)).toBe(createHash('sha256').update(jobIdText(c)).digest('hex'));
    expect(jobIdFor(c)).toMatch(/^[0-9a-f]{64}$/);
    expect(jobIdFor(c)).toMatch(/[a-f]/);
  });

  it('when the canonical text is built then keys are sorted and numbers written as in RFC 8785', () => {
    // RFC 8785 §3.2.2/§3.2.3: lexicographic key order, no white space, ECMAScript number form (4.50 → 4.5, 1E30 → 1e+30).
    const text = jobIdText({ b: 4.5, a: [1e30, 0.002], c: { z: 1, y: 2 } } as never, '9');
    expect(text).toBe('{"a":[1e+30,0.002],"b":4.5,"c":{"y":2,"z":1}}\nloamwave-solver-9');
  });

  it.each([
    ['keys in another order', () => parseCase({ receivers: base.receivers, domain: base.domain, grid: base.grid, ground: base.ground, frequency_hz: 20000 }), true],
    ['defaults written out', () => parseCase({ ...base, geometry: 'axisymmetric', source: { power_w: 1000, height_m: 0 } }), true],
    ['one value changed', () => parseCase({ ...base, frequency_hz: 20001 }), false],
  ])('when the case has %s then the id is the same: %s', (_what, make, same) => {
    expect(jobIdFor(make()) === jobIdFor(c)).toBe(same);
  });

  it('when the solver major version changes then every id changes', () => {
    expect(jobIdFor(c, '2')).not.toBe(jobIdFor(c, '1'));
  });
});
