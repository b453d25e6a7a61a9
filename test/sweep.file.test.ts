// Reading and validating sweep files: every mistake is one line naming the file, the path in it and the fix.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { UserError } from '../schemas/errors.js';
import { caseLeafPaths, editDistance, sweepJsonSchema } from '../schemas/sweep.js';
import { loadSweep, parseSweep } from '../coordinator/sweep/file.js';

const base = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 8 },
  receivers: { ranges_m: [10000, 30000] },
};
const sweepWith = (extra: Record<string, unknown>) => ({ name: 'test-sweep', base, ...extra });

function errorOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return (e as Error).message;
  }
  throw new Error('expected a UserError');
}

const dir = mkdtempSync(join(tmpdir(), 'loamwave-sweep-file-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('sweep file validation', () => {
  it.each([
    ['a bad listed value', { vary: { frequency_hz: { values: [20000, 30000, -5] } } }, 'sweep.yaml: vary.frequency_hz.values[2]: must be >= 100 (got -5)'],
    ['a bad generated value', { vary: { frequency_hz: { linear: { from: 50, to: 20000, count: 3 } } } }, 'sweep.yaml: vary.frequency_hz.linear[0]: must be >= 100 (got 50)'],
    ['a bad end of a sampled range', { design: { kind: 'latin_hypercube', samples: 4 }, vary: { 'ground.segments[0].conductivity_s_per_m': { uniform: { from: -1, to: 1 } } } }, 'sweep.yaml: vary.ground.segments[0].conductivity_s_per_m.uniform.from: must be > 0 (got -1)'],
    ['a misspelt path', { vary: { frequncy_hz: { values: [20000] } } }, 'sweep.yaml: vary.frequncy_hz: is not a parameter of the case; did you mean "frequency_hz"?'],
    ['a misspelt nested path', { vary: { 'ground.segment[0].conductivity': { values: [0.01] } } }, 'did you mean "ground.segments[0].conductivity_s_per_m"?'],
    ['an index beyond the base', { vary: { 'ground.segments[1].conductivity_s_per_m': { values: [0.01] } } }, 'vary.ground.segments[1].conductivity_s_per_m: the base case has 1 item(s) in ground.segments'],
    ['a sampled generator in a full factorial', { vary: { frequency_hz: { uniform: { from: 1e4, to: 2e4 } } } }, 'vary.frequency_hz.uniform: a uniform generator needs a sampled design'],
    ['a list generator in a sampled design', { design: { kind: 'saltelli', samples: 8 }, vary: { frequency_hz: { values: [1e4] }, 'grid.cells_per_wavelength': { uniform: { from: 8, to: 12 } } } }, 'vary.frequency_hz.values: a saltelli design samples ranges; use uniform or log_uniform'],
    ['two generators', { vary: { frequency_hz: { values: [1e4], log: { from: 1e4, to: 2e4, count: 2 } } } }, 'vary.frequency_hz: give only one generator, not values and log'],
    ['no generator', { vary: { frequency_hz: {} } }, 'vary.frequency_hz: give one generator'],
    ['a log range through zero', { vary: { 'source.height_m': { log: { from: 0, to: 10, count: 3 } } } }, 'vary.source.height_m.log.from: must be > 0 for a log generator (got 0)'],
    ['a saltelli design of one parameter', { design: { kind: 'saltelli', samples: 8 }, vary: { frequency_hz: { uniform: { from: 1e4, to: 2e4 } } } }, 'design.kind: a saltelli design needs at least 2 varied parameters'],
    ['a resolution axis that is not varied', { resolution_axis: 'grid.cells_per_wavelength', vary: { frequency_hz: { values: [1e4] } } }, 'resolution_axis: must be one of the varied paths (frequency_hz)'],
    ['an unknown design', { design: { kind: 'random' } }, 'design.kind must be one of "full_factorial", "latin_hypercube", "saltelli"'],
    ['too many design points', { vary: { frequency_hz: { linear: { from: 1e4, to: 2e4, count: 1000 } }, 'source.height_m': { linear: { from: 0, to: 10, count: 1001 } } } }, 'sweep.yaml: vary: the design has 1.00e+6 points, more than 1000000'],
    ['an unknown top-level key', { varry: {} }, 'unknown key(s) "varry"'],
  ])('when the sweep has %s then the error names the place and the fix', (_what, extra, expected) => {
    const msg = errorOf(() => parseSweep(sweepWith(extra), 'sweep.yaml'));
    expect(msg).toContain(expected);
    expect(msg.startsWith('sweep.yaml: ')).toBe(true);
    expect(msg).not.toContain('\n');
  });

  it('when the name could not be a folder name then it is refused', () => {
    expect(errorOf(() => parseSweep({ name: '../up', base }, 'sweep.yaml'))).toContain('sweep.yaml: name: must be 1–80 letters');
  });

  it.each([
    ['the only varied grid path is the default axis', { 'grid.cells_per_wavelength': { values: [8, 12, 16] }, frequency_hz: { values: [2e4] } }, 'grid.cells_per_wavelength'],
    ['no grid path leaves the axis unset', { frequency_hz: { values: [2e4] } }, undefined],
  ])('when %s then resolution_axis follows', (_what, vary, axis) => {
    expect(parseSweep(sweepWith({ vary }), 's').resolution_axis).toBe(axis);
  });

  it('when the vary paths are listed then each is a scalar of the case schema', () => {
    const paths = caseLeafPaths();
    for (const p of ['frequency_hz', 'ground.segments[0].conductivity_s_per_m', 'grid.cells_per_wavelength', 'upper_boundary.h_prime_km', 'receivers.ranges_m[0]']) {
      expect(paths).toContain(p);
    }
    expect(paths).not.toContain('ground.segments');
  });

  // Levenshtein distance examples (Wagner & Fischer, J. ACM 21(1), 1974; "kitten"/"sitting" is the usual textbook case, 3).
  it.each([
    ['kitten', 'sitting', 3],
    ['flaw', 'lawn', 2],
    ['', 'abc', 3],
    ['same', 'same', 0],
  ])('when the edit distance of %s and %s is taken then it is %i', (a, b, d) => {
    expect(editDistance(a, b)).toBe(d);
  });

  it('when the JSON Schema is exported then it describes name, base, vary and design', () => {
    const s = sweepJsonSchema() as { properties: Record<string, unknown>; required: string[] };
    expect(Object.keys(s.properties)).toEqual(expect.arrayContaining(['name', 'base', 'vary', 'design', 'resolution_axis']));
    expect(s.required).toEqual(expect.arrayContaining(['name', 'base']));
  });
});

describe('sweep files on disk', () => {
  it.each([
    ['YAML', 'ok.yaml', `name: quorvessin-vlf\nbase:\n  frequency_hz: 20000\n  ground: {segments: [{start_m: 0, conductivity_s_per_m: 0.003}]}\n  domain: {range_m: 60000, height_m: 20000}\n  receivers: {ranges_m: [10000]}\nvary:\n  frequency_hz: {values: [20000, 30000]}\n`],
    ['JSON', 'ok.json', JSON.stringify(sweepWith({ vary: { frequency_hz: { values: [20000, 30000] } } }))],
  ])('when a %s sweep file is loaded then the sweep and its text come back', (_kind, file, text) => {
    const path = join(dir, file);
    writeFileSync(path, text);
    const loaded = loadSweep(path);
    expect(loaded.text).toBe(text);
    expect(loaded.path).toBe(path);
    expect(Object.keys(loaded.sweep.vary)).toEqual(['frequency_hz']);
    expect(loaded.sweep.design).toEqual({ kind: 'full_factorial' });
  });

  it.each([
    ['broken YAML', 'bad.yaml', 'name: x\nbase: {frequency_hz: 1\n', 'bad.yaml: not valid YAML at line'],
    ['a duplicated YAML key', 'dup.yaml', 'name: x\nname: y\nbase: {}\n', 'dup.yaml: not valid YAML at line 2'],
    ['broken JSON', 'bad.json', '{"name": ', 'bad.json: not valid JSON'],
    ['a value error', 'neg.yaml', 'name: x\nbase: {}\nvary:\n  frequency_hz: {values: [-5]}\n', 'neg.yaml: vary.frequency_hz.values[0]: must be >= 100 (got -5)'],
  ])('when the file holds %s then the one-line error names the file', (_what, file, text, expected) => {
    const path = join(dir, file);
    writeFileSync(path, text);
    const msg = errorOf(() => loadSweep(path));
    expect(msg).toContain(expected);
    expect(msg).not.toContain('\n');
  });

  it('when the file does not exist then the error says so', () => {
    expect(errorOf(() => loadSweep(join(dir, 'missing.yaml')))).toContain('missing.yaml: cannot read the sweep file (no such file)');
  });
});
