// `loamwave solve CASE [--json]`: run one case and print the result (a table, or the result contract as JSON).
import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { oneLine, UserError } from '../../schemas/errors.js';
import type { JobResult } from '../../schemas/result.js';

export function readJsonFile(path: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new UserError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? 'error'}); check the path`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new UserError(`${path}: not valid JSON (${oneLine((e as Error).message)}); fix the syntax`);
  }
}

function table(r: JobResult): string {
  const lines = [
    `job ${r.job_id}  solver ${r.solver_version}  ${r.geometry}  ${r.frequency_hz} Hz`,
    `grid: cell ${r.grid.cell_size_m.toPrecision(5)} m, Δt ${r.grid.time_step_s.toPrecision(5)} s, ${r.grid.steps} steps, ` +
      `${r.grid.cells_range}×${r.grid.cells_height} cells (${r.grid.cells_ground} below ground), ${(r.grid.memory_bytes / 2 ** 20).toFixed(1)} MiB, ` +
      `${r.grid.settled ? 'settled' : 'NOT settled'}, wall ${r.wall_time_s.toFixed(2)} s`,
    '',
    'range_m      height_m  Ez dB(µV/m)  Ez phase°   |E_h/Ez|     |H| A/m',
  ];
  for (const x of r.receivers) {
    const ez = Math.hypot(x.ez.re, x.ez.im);
    lines.push(
      `${x.range_m.toFixed(0).padStart(9)}  ${x.height_m.toFixed(1).padStart(8)}  ${x.ez_db_uv_per_m.toFixed(3).padStart(11)}  ${x.ez_phase_deg
        .toFixed(2)
        .padStart(9)}  ${(Math.hypot(x.e_horizontal.re, x.e_horizontal.im) / ez).toExponential(3).padStart(10)}  ${Math.hypot(x.h.re, x.h.im)
        .toExponential(4)
        .padStart(11)}`,
    );
  }
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n') + '\n';
}

export function registerSolve(program: Command): void {
  program
    .command('solve')
    .description('run one case file and print field strength and phase at its receivers')
    .argument('<case>', 'case file (JSON); `loamwave schema case` prints its schema')
    .option('--json', 'print the result as JSON (the result contract)')
    .action(async (path: string, opts: { json?: boolean }) => {
      const [{ parseCase }, { solve }, { jobIdFor }] = await Promise.all([
        import('../../schemas/case.js'),
        import('../../solver/index.js'),
        import('../sweep/job-id.js'),
      ]);
      const c = parseCase(readJsonFile(path), path);
      const t0 = process.hrtime.bigint();
      const r = solve(c);
      const wall = Number(process.hrtime.bigint() - t0) / 1e9;
      const result: JobResult = { ...r, job_id: jobIdFor(c), wall_time_s: wall };
      process.stdout.write(opts.json ? JSON.stringify(result, null, 2) + '\n' : table(result));
    });
}
