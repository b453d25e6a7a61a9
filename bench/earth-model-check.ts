// The earth-model example's spherical runs against Millington's mixed-path method on the residue-series curves
// (the reference of the verify check mixed-path-sphere), read from a finished output folder:
//   npx loamwave run examples/yelquandor-earth-model.yaml
//   npm run build && node dist/bench/earth-model-check.js [out/yelquandor-earth-model]
// Prints, per earth radius and receiver, the FDTD field, the reference and their difference (dB). Too long a run
// for the test suite (three jobs of about 1.2e10 cell updates each); its figures are in the README.
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { parse } from 'yaml';
import { readFileSync } from 'node:fs';
import { parseCase } from '../schemas/case.js';
import { pecDipoleFarFieldRmsVPerM } from '../solver/references/dipole.js';
import { millingtonField, pathToRange } from '../solver/references/millington.js';
import { sphericalEarthFieldRatio } from '../solver/references/spherical-earth.js';

interface Ground {
  sigma: number;
  epsR: number;
}

async function main(dir: string): Promise<void> {
  const sweep = parse(readFileSync(join(dir, 'sweep.yaml'), 'utf8')) as { base: unknown };
  const base = parseCase(sweep.base, 'sweep.yaml base');
  if (base.ground.model !== 'impedance') throw new Error('the example has an impedance ground');
  const segments = (base.ground.segments ?? []).map((s) => ({ startM: s.start_m, ground: { sigma: s.conductivity_s_per_m, epsR: s.relative_permittivity } }));
  const f = base.frequency_hz;
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  const glob = join(dir, 'fields', '**', '*.parquet').replaceAll("'", "''");
  const reader = await con.runAndReadAll(
    `SELECT earth_radius_m, range_m, ez_db_uv_per_m FROM read_parquet('${glob}', hive_partitioning = true)
     WHERE geometry = 'spherical' AND height_m = 0 ORDER BY earth_radius_m, range_m`,
  );
  let worst = 0;
  for (const row of reader.getRowObjects()) {
    const radiusM = Number(row.earth_radius_m);
    const d = Number(row.range_m);
    const curve = (g: Ground, x: number) => sphericalEarthFieldRatio(f, g.sigma, g.epsR, radiusM, x, { deltaForm: 'surface-impedance' });
    const ratio = millingtonField(pathToRange(segments, d), curve);
    // the curves' reference: the far field of the dipole over a perfect flat ground (≈ 300·√P(kW)/d(km) mV/m)
    const flatPecDb = 20 * Math.log10(pecDipoleFarFieldRmsVPerM(base.source.power_w, d) * 1e6);
    const want = flatPecDb + ratio.db;
    const got = Number(row.ez_db_uv_per_m);
    worst = Math.max(worst, Math.abs(got - want));
    console.log(`radius ${(radiusM / 1000).toFixed(0)} km  ${(d / 1000).toFixed(0).padStart(5)} km  FDTD ${got.toFixed(2)}  Millington ${want.toFixed(2)}  dB(µV/m)  diff ${(got - want).toFixed(2)} dB`);
  }
  console.log(`largest |difference|: ${worst.toFixed(2)} dB`);
  con.closeSync();
  db.closeSync();
}

main(process.argv[2] ?? join('out', 'yelquandor-earth-model')).catch((e: unknown) => {
  console.error(`error: ${(e as Error).message}`);
  process.exit(1);
});
