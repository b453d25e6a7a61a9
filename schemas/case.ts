// One case (one solver job), as a zod schema: the single source of truth for its shape, defaults and limits.
// Parsed at the edges (file, queue payload, command line); inside, a `Case` is trusted.
import { z } from 'zod';
import { UserError, userErrorFromZod } from './errors.js';

const positive = (what: string) =>
  z.number({ error: `expected a number (${what})` }).positive().finite();

export const GroundSegmentSchema = z.strictObject({
  /** Range where this segment starts, m; the first segment starts at 0. */
  start_m: z.number().min(0).finite(),
  /** Ground conductivity, S/m. */
  conductivity_s_per_m: positive('ground conductivity in S/m'),
  /** Ground relative permittivity (>= 1). */
  relative_permittivity: z.number().min(1).finite().default(15),
});

export const GroundSchema = z
  .strictObject({
    /** `impedance`: surface impedance at the ground row; `resolved`: lossy cells below ground; `pec`: perfect. */
    model: z.enum(['impedance', 'resolved', 'pec']).default('impedance'),
    segments: z.array(GroundSegmentSchema).min(1).optional(),
    /**
     * How the impedance condition samples H: `extrapolated` (linear extrapolation to the surface from the two rows
     * above, second order) or `half_cell` (H half a cell above the surface stands in for H at it, first order).
     */
    impedance_sampling: z.enum(['extrapolated', 'half_cell']).default('extrapolated'),
    /** Resolved ground: depth meshed, in skin depths of the most penetrable segment (>= 3). */
    resolved_depth_skin_depths: z.number().min(3).max(20).default(4),
  })
  .superRefine((g, ctx) => {
    if (g.model !== 'pec' && (g.segments === undefined || g.segments.length === 0)) {
      ctx.addIssue({
        code: 'custom',
        path: ['segments'],
        message: `is required for ground model "${g.model}"; give at least one segment such as {"start_m": 0, "conductivity_s_per_m": 0.003, "relative_permittivity": 15}`,
      });
      return;
    }
    const segs = g.segments ?? [];
    if (segs.length > 0 && segs[0].start_m !== 0) {
      ctx.addIssue({ code: 'custom', path: ['segments', 0, 'start_m'], message: 'the first segment must start at 0' });
    }
    for (let i = 1; i < segs.length; i++) {
      if (!(segs[i].start_m > segs[i - 1].start_m)) {
        ctx.addIssue({
          code: 'custom',
          path: ['segments', i, 'start_m'],
          message: `must be greater than segments[${i - 1}].start_m (${segs[i - 1].start_m}); list segments in order of range`,
        });
      }
    }
  });

export const UpperBoundarySchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ kind: z.literal('open') }),
    z.strictObject({ kind: z.literal('pec'), height_m: positive('ceiling height in m') }),
    z.strictObject({
      kind: z.literal('exponential'),
      /** Reference height h′ of the exponential conductivity profile, km (Wait & Spies 1964). */
      h_prime_km: z.number().min(30).max(120),
      /** Sharpness β, 1/km. */
      beta_per_km: z.number().min(0.1).max(2),
    }),
  ],
  { error: 'upper_boundary.kind must be one of "open", "pec", "exponential"' },
);

export const GridSchema = z
  .strictObject({
    /** Cells per free-space wavelength at the job's frequency (square cells). */
    cells_per_wavelength: z.number().min(6).max(400).optional(),
    /** Cell size, m (alternative to cells_per_wavelength). */
    cell_size_m: positive('cell size in m').optional(),
    /** Courant number as a fraction of the 2-D limit; the on-axis update needs < 0.951 (default 0.9). */
    courant: z.number().gt(0).max(0.94).default(0.9),
    /** Thickness of each absorbing layer, cells. */
    absorbing_cells: z.number().int().min(8).max(200).default(40),
    /**
     * `along_ground`: scale ε, μ and σ everywhere by one factor so that a wave along the ground has the exact
     * free-space phase velocity at the job's frequency on this grid (removes most of the phase error of numerical
     * dispersion on ground-wave paths; waves at other angles are then slightly fast). `none`: the plain Yee grid.
     */
    dispersion_correction: z.enum(['none', 'along_ground']).default('none'),
    /**
     * Storage of the field arrays Ex, Ez, Hy: `float64` (the default) or `float32`, which halves their memory and
     * the memory traffic of grids larger than the cache; every update is still computed in double precision and
     * rounded once when stored. Every published-reference check passes with either (`loamwave verify --fields`).
     */
    field_precision: z.enum(['float64', 'float32']).default('float64'),
  })
  .refine((g) => !(g.cells_per_wavelength !== undefined && g.cell_size_m !== undefined), {
    message: 'give either cells_per_wavelength or cell_size_m, not both',
  });

/** Mean earth radius, m (IUGG mean radius R1 = 6 371 008.8 m, Moritz, Geodetic Reference System 1980, rounded). */
export const MEAN_EARTH_RADIUS_M = 6_371_000;
/** Smallest and largest sphere radius accepted, m: from a small moon to a sphere flat enough for any path. */
export const EARTH_RADIUS_MIN_M = 1e5;
export const EARTH_RADIUS_MAX_M = 1e12;

/** The earth models: a flat earth with a line source (`planar`) or a vertical dipole (`axisymmetric`), or a sphere. */
export const GeometrySchema = z.enum(['axisymmetric', 'planar', 'spherical']);
export type Geometry = z.infer<typeof GeometrySchema>;

/**
 * The sphere of the `spherical` geometry. Optional and without a default: an absent block stays absent in the
 * parsed case (job ids hash the parsed case, so a default here would change every existing job's id); the solver
 * then uses MEAN_EARTH_RADIUS_M. A flat geometry (`planar`, `axisymmetric`) accepts the block and ignores it, so
 * one base case can sweep `geometry` between flat and spherical.
 */
export const EarthSchema = z.strictObject({
  /** Radius of the earth sphere, m (e.g. 6 371 000, or 8 495 000 for the 4/3 effective radius). */
  radius_m: z
    .number({ error: 'expected a number (earth radius in m)' })
    .finite()
    .min(EARTH_RADIUS_MIN_M)
    .max(EARTH_RADIUS_MAX_M),
});

export const CaseSchema = z
  .strictObject({
    /**
     * `axisymmetric` (flat earth, r–z, vertical dipole on the axis), `planar` (flat earth, x–z, vertical line
     * current) or `spherical` (a sphere of `earth.radius_m`, ρ–θ, vertical dipole on the polar axis; ranges are
     * great-circle distances along the surface and heights are above it).
     */
    geometry: GeometrySchema.default('axisymmetric'),
    /** The sphere for `spherical` (ignored by the flat geometries); absent: the mean earth radius. */
    earth: EarthSchema.optional(),
    frequency_hz: z.number().min(100).max(3e6),
    source: z
      .strictObject({
        /** Power the source would radiate over perfectly conducting ground, W (per metre for planar). */
        power_w: positive('radiated power in W').default(1000),
        /** Height of the source element's base above ground, m. */
        height_m: z.number().min(0).finite().default(0),
      })
      .default({ power_w: 1000, height_m: 0 }),
    ground: GroundSchema,
    upper_boundary: UpperBoundarySchema.default({ kind: 'open' }),
    domain: z.strictObject({
      /** Range of the computed region (excluding the absorbing layer), m; along the surface on the sphere. */
      range_m: positive('domain range in m'),
      /** Height of the computed region (excluding the absorbing layer), m. */
      height_m: positive('domain height in m'),
    }),
    grid: GridSchema.default({ courant: 0.9, absorbing_cells: 40, dispersion_correction: 'none', field_precision: 'float64' }),
    receivers: z.strictObject({
      ranges_m: z.array(positive('receiver range in m')).min(1).max(10000),
      height_m: z.number().min(0).finite().default(0),
    }),
    /** Run control: settling and DFT window, in periods of the source frequency. */
    run: z
      .strictObject({
        ramp_periods: z.number().int().min(1).max(50).default(3),
        dft_periods: z.number().int().min(1).max(100).default(2),
        /** Upper bound on time steps; the run stops with a warning if not settled by then. */
        max_steps: z.number().int().min(100).max(50_000_000).default(2_000_000),
      })
      .default({ ramp_periods: 3, dft_periods: 2, max_steps: 2_000_000 }),
  })
  .superRefine((c, ctx) => {
    if (c.geometry === 'spherical') {
      // θ must stay below π (the antipode) with room for the far-side absorbing layer
      const radiusM = c.earth?.radius_m ?? MEAN_EARTH_RADIUS_M;
      const maxRangeM = 0.9 * Math.PI * radiusM;
      if (c.domain.range_m > maxRangeM) {
        ctx.addIssue({
          code: 'custom',
          path: ['domain', 'range_m'],
          message: `must be <= 0.9 of half the circumference (${Math.round(maxRangeM)} m for earth.radius_m = ${radiusM}) on the spherical geometry; shorten the path or enlarge earth.radius_m`,
        });
      }
      if (c.domain.height_m > radiusM) {
        ctx.addIssue({ code: 'custom', path: ['domain', 'height_m'], message: `must be <= earth.radius_m (${radiusM}) on the spherical geometry` });
      }
    }
    c.receivers.ranges_m.forEach((r, i) => {
      if (r >= c.domain.range_m) {
        ctx.addIssue({
          code: 'custom',
          path: ['receivers', 'ranges_m', i],
          message: `must be inside the domain (< domain.range_m = ${c.domain.range_m}); enlarge domain.range_m or move the receiver`,
        });
      }
    });
    if (c.receivers.height_m >= c.domain.height_m) {
      ctx.addIssue({
        code: 'custom',
        path: ['receivers', 'height_m'],
        message: `must be below domain.height_m (${c.domain.height_m})`,
      });
    }
    if (c.upper_boundary.kind === 'pec' && c.upper_boundary.height_m > c.domain.height_m) {
      ctx.addIssue({
        code: 'custom',
        path: ['upper_boundary', 'height_m'],
        message: `must be <= domain.height_m (${c.domain.height_m}); the ceiling closes the domain`,
      });
    }
    if (c.upper_boundary.kind === 'exponential' && c.upper_boundary.h_prime_km * 1000 >= c.domain.height_m) {
      ctx.addIssue({
        code: 'custom',
        path: ['upper_boundary', 'h_prime_km'],
        message: `the reference height (${c.upper_boundary.h_prime_km} km) must lie inside the domain; raise domain.height_m above ${c.upper_boundary.h_prime_km * 1000} m`,
      });
    }
    for (const seg of c.ground.segments ?? []) {
      if (seg.start_m >= c.domain.range_m) {
        ctx.addIssue({
          code: 'custom',
          path: ['ground', 'segments'],
          message: `a segment starts at ${seg.start_m} m, beyond domain.range_m (${c.domain.range_m}); remove it`,
        });
        break;
      }
    }
  });

/** A case as the user wrote it. */
export type CaseInput = z.input<typeof CaseSchema>;
/** A case with every default filled in. */
export type Case = z.output<typeof CaseSchema>;
export type GroundSegment = z.output<typeof GroundSegmentSchema>;

/** Radius of the sphere a case runs on, m (the mean earth radius when `earth` is absent). */
export function earthRadiusM(c: Pick<Case, 'earth'>): number {
  return c.earth?.radius_m ?? MEAN_EARTH_RADIUS_M;
}

/** Parse and validate a case; `source` names where it came from (a file name, `sweep job 12`). */
export function parseCase(input: unknown, source = 'case'): Case {
  const r = CaseSchema.safeParse(input);
  if (!r.success) throw userErrorFromZod(r.error, input, source, 'loamwave.case.invalid');
  return r.data;
}

/** JSON Schema of the case file (as written by users: defaults optional). */
export function caseJsonSchema(): unknown {
  return z.toJSONSchema(CaseSchema, { io: 'input', unrepresentable: 'any' });
}

export { UserError };
