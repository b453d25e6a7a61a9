// `plan`'s wall-time estimate against the measured wall time of the same sweep run embedded on 2 workers, for the
// quick demo, the Saltelli example and a sweep with many receivers (an invented case written to a scratch folder):
//   npm run build && node dist/bench/plan-accuracy.js
// Target: each estimate within 25 % of the measured time. The solver costs are measured afresh (--remeasure), and
// what a run spends beyond solving is learned first from two warm-up runs of other sweeps (the quick demo to another
// folder, and 6 jobs × 500 receivers), as `plan` learns it from a user's earlier runs.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';

const ROOT = resolve(import.meta.dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'loamwave.js');
const WORKERS = 2;

/** 24 jobs × 400 receivers: the Quorvessin coast path with a receiver every 200 m from 10 to 90 km. */
const MANY_RECEIVERS = `name: bench-many-receivers
description: invented bench sweep, 400 receivers per job
base:
  frequency_hz: 20000
  source: { power_w: 1000 }
  ground:
    model: impedance
    segments:
      - { start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 22 }
      - { start_m: 10000, conductivity_s_per_m: 5, relative_permittivity: 70 }
  domain: { range_m: 100000, height_m: 30000 }
  grid: { cells_per_wavelength: 12 }
  receivers: { ranges_m: [${Array.from({ length: 400 }, (_, i) => 10000 + i * 200).join(', ')}] }
vary:
  ground.segments[1].start_m: { values: [5000, 10000, 15000, 20000] }
  ground.segments[0].conductivity_s_per_m: { values: [0.001, 0.002, 0.003, 0.005, 0.01, 0.02] }
`;

/** Warm-up: 6 jobs × 500 receivers on another invented path, for the overhead's per-row part. */
const WARM_UP = `name: bench-warm-up
description: invented bench sweep, 500 receivers per job
base:
  frequency_hz: 25000
  ground: { model: impedance, segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] }
  domain: { range_m: 80000, height_m: 25000 }
  grid: { cells_per_wavelength: 10 }
  receivers: { ranges_m: [${Array.from({ length: 500 }, (_, i) => 5000 + i * 140).join(', ')}] }
vary:
  ground.segments[0].conductivity_s_per_m: { values: [0.002, 0.005, 0.01, 0.02, 0.05, 0.1] }
`;

function cli(args: string[], env: NodeJS.ProcessEnv): { out: string; seconds: number } {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', env, maxBuffer: 1 << 28 });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`loamwave ${args.join(' ')} exited ${r.status}: ${r.stderr.trim().split('\n').pop()}`);
  return { out: r.stdout, seconds };
}

function main(): void {
  const scratch = mkdtempSync(join(tmpdir(), 'loamwave-plan-bench-'));
  const env = { ...process.env, LOAMWAVE_CACHE_DIR: join(scratch, 'cache') };
  try {
    const many = join(scratch, 'many-receivers.yaml');
    writeFileSync(many, MANY_RECEIVERS);
    const sweeps: Array<[string, string]> = [
      ['demo (quorvessin-vlf-coast)', join(ROOT, 'examples', 'quorvessin-vlf-coast.yaml')],
      ['Saltelli example (yelquandor-timing-saltelli)', join(ROOT, 'examples', 'yelquandor-timing-saltelli.yaml')],
      ['many receivers (24 jobs × 400)', many],
    ];
    cli(['plan', sweeps[0][1], '--json', '--remeasure'], env); // measure the costs once, into the scratch cache
    const warm = join(scratch, 'warm-up.yaml');
    writeFileSync(warm, WARM_UP);
    for (const [i, f] of [sweeps[0][1], warm].entries()) cli(['run', f, '--workers', String(WORKERS), '--out', join(scratch, `warm-${i}`), '--no-report'], env);
    console.log(`plan's wall-time estimate against the measured run, embedded, ${WORKERS} workers (target: within 25 %)`);
    for (const [name, file] of sweeps) {
      const plan = JSON.parse(cli(['plan', file, '--json', '--workers', String(WORKERS)], env).out) as { wall_hours: number; jobs: number; overhead_s: number };
      const estimateS = plan.wall_hours * 3600;
      const out = join(scratch, `out-${sweeps.findIndex((s) => s[1] === file)}`);
      const measured = cli(['run', file, '--workers', String(WORKERS), '--out', out, '--no-report'], env).seconds;
      const err = (estimateS - measured) / measured;
      console.log(
        `${name.padEnd(48)} ${String(plan.jobs).padStart(4)} jobs  plan ${estimateS.toFixed(1).padStart(7)} s  run ${measured.toFixed(1).padStart(7)} s  ` +
          `error ${(err * 100).toFixed(0).padStart(4)} %  ${Math.abs(err) <= 0.25 ? 'met' : 'NOT met'}  (plan: solving ${(estimateS - plan.overhead_s).toFixed(1)} s + overhead ${plan.overhead_s.toFixed(1)} s)`,
      );
    }
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

main();
