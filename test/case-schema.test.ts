// The case schema: defaults filled in, errors name the field path and the fix.
import { describe, expect, it } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';

const base = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 300000, height_m: 60000 },
  receivers: { ranges_m: [50000, 100000] },
};

function errorOf(input: unknown): string {
  try {
    parseCase(input, 'case.json');
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return (e as Error).message;
  }
  throw new Error('expected a UserError');
}

describe('case schema', () => {
  it('when optional parts are left out then the documented defaults are filled in', () => {
    const c = parseCase(base);
    expect(c.geometry).toBe('axisymmetric');
    expect(c.source).toEqual({ power_w: 1000, height_m: 0 });
    expect(c.upper_boundary).toEqual({ kind: 'open' });
    expect(c.grid.courant).toBe(0.9);
    expect(c.ground.impedance_sampling).toBe('extrapolated');
    expect(c.receivers.height_m).toBe(0);
    expect(c.grid.field_precision).toBe('float64');
    expect(parseCase({ ...base, grid: { cells_per_wavelength: 20 } }).grid.field_precision).toBe('float64');
  });

  it('when grid.field_precision is not float64 or float32 then the error names the field and the choices', () => {
    const msg = errorOf({ ...base, grid: { field_precision: 'half' } });
    expect(msg).toContain('grid.field_precision');
    expect(msg).toMatch(/float64/);
    expect(msg).toMatch(/float32/);
    expect(msg.split('\n')).toHaveLength(1);
  });

  it('when the earth block is left out then it stays out of the parsed case (job ids unchanged), and a flat geometry accepts it', () => {
    expect('earth' in parseCase(base)).toBe(false);
    expect('earth' in parseCase({ ...base, geometry: 'spherical' })).toBe(false);
    expect(parseCase({ ...base, geometry: 'planar', earth: { radius_m: 8.495e6 } }).earth).toEqual({ radius_m: 8.495e6 });
  });

  it.each([
    [{ ...base, frequency_hz: -5 }, 'case.json: frequency_hz: must be >= 100 (got -5)'],
    [
      { ...base, ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0 }] } },
      'case.json: ground.segments[0].conductivity_s_per_m: must be > 0 (got 0)',
    ],
    [{ ...base, receivers: { ranges_m: [400000] } }, 'receivers.ranges_m[0]: must be inside the domain'],
    [{ ...base, upper_boundary: { kind: 'lid' } }, 'upper_boundary.kind'],
    [{ ...base, ground: { model: 'impedance' } }, 'ground.segments: is required for ground model "impedance"'],
    [{ ...base, colour: 'red' }, 'unknown key(s) "colour"'],
    [{ ...base, geometry: 'spherical', earth: { radius_m: 6371 } }, 'case.json: earth.radius_m: must be >= 100000 (got 6371)'],
    [{ ...base, geometry: 'spherical', earth: { radius_m: 6.371e6, flattening: 0.003 } }, 'earth: unknown key(s) "flattening"'],
    [{ ...base, geometry: 'spherical', earth: { radius_m: 1e6 }, domain: { range_m: 3e6, height_m: 6e4 } }, 'domain.range_m: must be <= 0.9 of half the circumference'],
  ])('when the case is wrong then the one-line error names the field (%#)', (input, expected) => {
    const msg = errorOf(input);
    expect(msg).toContain(expected);
    expect(msg).not.toContain('\n');
  });
});
