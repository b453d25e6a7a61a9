// The sweep file's JSON Schema, as an editor sees it, checked with a general-purpose JSON Schema validator from npm
// (Ajv, draft 2020-12, the draft zod writes): every example sweep passes; a misspelt key in the base case, a varied
// value outside its parameter's own limits and an unknown vary path each fail.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { parse as parseYaml } from 'yaml';
import { describe, expect, it } from 'vitest';
import { sweepJsonSchema } from '../schemas/sweep.js';
import { PROJECT_ROOT } from './helpers/compiled.js';

const ajv = new Ajv2020({ allErrors: true, strict: false });
const validate = ajv.compile(sweepJsonSchema() as object);
const base = {
  frequency_hz: 20000,
  ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }, { start_m: 10000, conductivity_s_per_m: 5, relative_permittivity: 70 }] },
  domain: { range_m: 60000, height_m: 20000 },
  receivers: { ranges_m: [10000, 30000] },
};
const errorsOf = (doc: unknown) => (validate(doc) ? [] : (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message}`));

describe('the sweep JSON Schema in a general-purpose validator', () => {
  const examples = readdirSync(join(PROJECT_ROOT, 'examples')).filter((f) => /\.(ya?ml|json)$/.test(f));

  it.each(examples)('when it reads the example %s then it accepts it', (file) => {
    const doc = parseYaml(readFileSync(join(PROJECT_ROOT, 'examples', file), 'utf8'));
    expect(errorsOf(doc)).toEqual([]);
  });

  it.each<[string, Record<string, unknown>, RegExp]>([
    ['a misspelt key in base', { base: { ...base, recievers: { ranges_m: [1000] } } }, /\/base must NOT have additional properties/],
    ['a frequency of −5 in vary', { vary: { frequency_hz: { values: [20000, -5] } } }, /\/vary\/frequency_hz\/values\/1 must be >= 100/],
    ['a negative conductivity in a range', { vary: { 'ground.segments[1].conductivity_s_per_m': { linear: { from: -1, to: 5, count: 3 } } } }, /conductivity_s_per_m\/linear\/from/],
    ['a log range from zero', { vary: { 'source.power_w': { log: { from: 0, to: 1000, count: 4 } } } }, /power_w\/log\/from/],
    ['an unknown vary path', { vary: { 'ground.segmets[0].conductivity_s_per_m': { values: [0.01] } } }, /\/vary must NOT have additional properties/],
    ['a range over a text parameter', { vary: { 'ground.model': { linear: { from: 1, to: 2, count: 2 } } } }, /\/vary\/ground\.model must NOT have additional properties/],
  ])('when the sweep has %s then it refuses it', (_what, extra, message) => {
    const errors = errorsOf({ name: 'schema-test', base, ...extra });
    expect(errors.join('\n')).toMatch(message);
  });

  it('when a parameter is varied that the base leaves out then the base still passes (defaults fill it in)', () => {
    const { frequency_hz: _f, ...noFrequency } = base;
    expect(errorsOf({ name: 'schema-test', base: noFrequency, vary: { frequency_hz: { values: [20000, 40000] }, 'ground.model': { values: ['impedance', 'pec'] } } })).toEqual([]);
  });
});
