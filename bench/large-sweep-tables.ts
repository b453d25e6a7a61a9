// A large sweep's output tables, made up, for the report's size and layout checks (bench/report-size.ts and
// test/report.html.test.ts): 2,000 runs × 500 receivers by default, as `readReportFolder` would return them.
// The numbers are invented (a 1/d fall with an invented loss and a little pseudo-random scatter): this is a test of
// how big the page gets and whether it renders, not of the physics (the physics checks are in solver/verify/).
// sensitivity.parquet is made up too (the outputs stage would have written it; computing it from these fields takes
// about a minute, which is the outputs stage's time, not the report's).
import type { FolderTables, FieldRecord, RunRecord } from '../coordinator/analysis/read-tables.js';
import type { SensitivityRow } from '../schemas/analysis-rows.js';
import { createPrng } from '../coordinator/sampling/prng.js';
import { parseSweep } from '../coordinator/sweep/file.js';
import { C0 } from '../solver/constants.js';

export interface LargeSweepOptions {
  /** Frequencies, Hz (a listed input with few values: one band each in the plots). Default 5 values, 16–32 kHz. */
  readonly frequenciesHz?: readonly number[];
  /** Number of ground conductivities, spaced in decades from 1e-4 to 1 S/m (many values: binned). Default 20. */
  readonly conductivities?: number;
  /** Number of relative permittivities from 5 to 40 (many values: binned). Default 20. */
  readonly permittivities?: number;
  /** Receivers, every `receiverSpacingM` from the first; default 500. */
  readonly receivers?: number;
  /** Receiver spacing, m; default 1,000. */
  readonly receiverSpacingM?: number;
  /** PRNG seed of the scatter; default 7. */
  readonly seed?: number;
}

/** Runs = frequencies × conductivities × permittivities (a full factorial; 5 × 20 × 20 = 2,000 by default). */
export function largeSweepTables(options: LargeSweepOptions = {}): FolderTables {
  const frequencies = options.frequenciesHz ?? [16e3, 20e3, 24e3, 28e3, 32e3];
  const nSigma = options.conductivities ?? 20;
  const nEps = options.permittivities ?? 20;
  const nRx = options.receivers ?? 500;
  const spacingM = options.receiverSpacingM ?? 1000;
  const rng = createPrng(options.seed ?? 7);
  const ranges = Array.from({ length: nRx }, (_, k) => (k + 2) * spacingM);
  const sweep = parseSweep(
    {
      name: 'vorsenmark-large-demo',
      description: 'Invented numbers for the report size check: the Vorsenmark demo path over many grounds.',
      base: {
        frequency_hz: 20000,
        ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }] },
        domain: { range_m: ranges[ranges.length - 1] + 20e3, height_m: 100e3 },
        receivers: { ranges_m: ranges },
      },
      vary: {
        frequency_hz: { values: [...frequencies] },
        'ground.segments[0].conductivity_s_per_m': { log: { from: 1e-4, to: 1, count: nSigma } },
        'ground.segments[0].relative_permittivity': { linear: { from: 5, to: 40, count: nEps } },
      },
    },
    'sweep.yaml',
  );
  const runs: RunRecord[] = [];
  const fields: FieldRecord[] = [];
  let index = 0;
  for (const f of frequencies) {
    for (let i = 0; i < nSigma; i++) {
      const sigma = 10 ** (-4 + (4 * i) / Math.max(1, nSigma - 1));
      for (let j = 0; j < nEps; j++) {
        const eps = 5 + (35 * j) / Math.max(1, nEps - 1);
        const job = `synthetic${String(index).padStart(6, '0')}${'0'.repeat(49)}`;
        runs.push({
          job_id: job,
          index,
          status: 'done',
          frequency_hz: f,
          ground_segments_0_conductivity_s_per_m: sigma,
          ground_segments_0_relative_permittivity: eps,
          cell_size_m: C0 / f / 16,
          steps: 4000,
          cells_total: 250_000,
          wall_time_s: 0.5,
          warnings: null,
          error: null,
        });
        // Invented loss: grows with range and frequency, falls with conductivity; scatter ±0.2 dB and ±1°.
        const lossPerM = Math.sqrt(f / 20e3) / (2e6 * Math.sqrt(sigma)) + 1e-7 * eps;
        for (const r of ranges) {
          const eRms = (0.3 / (r / 1000)) * Math.exp(-r * lossPerM);
          const lagDeg = (10 * r * lossPerM) / (1 + r * lossPerM);
          const phase = -(360 * f * r) / C0 - lagDeg + 2 * (rng.nextFloat() - 0.5);
          fields.push({
            job_id: job,
            range_m: r,
            height_m: 0,
            ez_db_uv_per_m: 20 * Math.log10(eRms / 1e-6) + 0.4 * (rng.nextFloat() - 0.5),
            ez_phase_deg: ((((phase + 180) % 360) + 360) % 360) - 180,
          });
        }
        index++;
      }
    }
  }
  // Made-up SRC and μ* rows for every output, as sensitivity.parquet holds them (6,000 rows by default).
  const columns = ['frequency_hz', 'ground_segments_0_conductivity_s_per_m', 'ground_segments_0_relative_permittivity'];
  const sensitivity: SensitivityRow[] = ranges.flatMap((r) =>
    ['ez_db_uv_per_m', 'residual_phase_deg'].flatMap((output) =>
      columns.flatMap((parameter) => [
        { output: `${output}@${r / 1000}km`, parameter, measure: 'src' as const, value: 2 * rng.nextFloat() - 1, ci_low: null, ci_high: null, confidence: null, samples: runs.length, r_squared: rng.nextFloat() },
        { output: `${output}@${r / 1000}km`, parameter, measure: 'mu_star' as const, value: 5 * rng.nextFloat(), ci_low: null, ci_high: null, confidence: null, samples: runs.length, r_squared: null },
      ]),
    ),
  );
  return {
    sweep,
    sweepFileName: 'sweep.yaml',
    runColumns: Object.keys(runs[0]),
    runs,
    fields,
    // No resolution axis varies: no convergence study (the empty table the outputs stage writes).
    convergence: [],
    sensitivity,
  };
}
