// The example sweep files: each loads, expands and fits the default memory cap; the resolution study has at least
// three levels; the sampled one is a Saltelli design; ground constants stay within physically sensible ranges.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { estimateCost } from '../solver/index.js';
import { loadSweep } from '../coordinator/sweep/file.js';
import { expandSweep } from '../coordinator/sweep/expand.js';

const EXAMPLES = join(import.meta.dirname, '..', 'examples');
const files = readdirSync(EXAMPLES).filter((f) => f.endsWith('.yaml')).sort();

describe('example sweeps', () => {
  it('when the examples folder is listed then it holds a quick sweep, a resolution study, a Saltelli design and flat against sphere', () => {
    const sweeps = files.map((f) => loadSweep(join(EXAMPLES, f)).sweep);
    const levels = (s: (typeof sweeps)[number]) => {
      const g = s.resolution_axis ? s.vary[s.resolution_axis] : undefined;
      return g?.values?.length ?? g?.linear?.count ?? g?.log?.count ?? 0;
    };
    expect(sweeps.some((s) => levels(s) >= 3)).toBe(true);
    expect(sweeps.some((s) => s.design.kind === 'saltelli')).toBe(true);
    // flat against sphere in one sweep: its jobs hold both a flat geometry and the spherical one
    const geometries = files.map((f) => new Set(expandSweep(loadSweep(join(EXAMPLES, f)).sweep, f).map((j) => j.case.geometry)));
    expect(geometries.some((g) => g.has('spherical') && g.has('axisymmetric'))).toBe(true);
  });

  it.each(files)('when %s is expanded then every job is valid, small and on sensible ground', (file) => {
    const { sweep } = loadSweep(join(EXAMPLES, file));
    const jobs = expandSweep(sweep, file);
    expect(jobs.length).toBeGreaterThan(0);
    expect(jobs.length).toBeLessThanOrEqual(60);
    for (const j of jobs) {
      // Small enough for a laptop: well under 1 GiB a job (examples are demos, not studies).
      expect(estimateCost(j.case).memory_bytes).toBeLessThan(2 ** 30);
      for (const seg of j.case.ground.segments ?? []) {
        // ITU-R P.368 ground classes (from memory) span 1e-5 S/m (cold ice) to 5 S/m (sea), εr 3 to 80.
        expect(seg.conductivity_s_per_m).toBeGreaterThanOrEqual(1e-5);
        expect(seg.conductivity_s_per_m).toBeLessThanOrEqual(5);
        expect(seg.relative_permittivity).toBeGreaterThanOrEqual(3);
        expect(seg.relative_permittivity).toBeLessThanOrEqual(81);
      }
    }
  });
});
