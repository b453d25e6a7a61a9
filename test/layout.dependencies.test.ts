// The dependency rule of DEVELOPERS.md, checked with a general-purpose dependency linter (dependency-cruiser, from
// npm) over the source folders: schemas <- solver <- worker <- coordinator; inside the coordinator, commands ->
// {dispatch, queue, outputs, report} -> {sweep, ledger, analysis, sampling}; nothing imports commands/; the solver
// does no I/O; no import cycles. The rules themselves are in .dependency-cruiser.cjs.
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { PROJECT_ROOT } from './helpers/compiled.js';

interface CruiseOutput {
  summary: { violations: Array<{ rule: { name: string }; from: string; to: string }>; totalCruised: number };
}

function cruise(folders: string[], cwd = PROJECT_ROOT): CruiseOutput {
  const bin = join(PROJECT_ROOT, 'node_modules', '.bin', 'depcruise');
  const out = execFileSync(bin, [...folders, '--config', join(PROJECT_ROOT, '.dependency-cruiser.cjs'), '--output-type', 'json'], {
    cwd,
    encoding: 'utf8',
    maxBuffer: 64 * 2 ** 20,
  });
  return JSON.parse(out) as CruiseOutput;
}

describe('layout', () => {
  it('when the source folders are cruised then no import breaks the dependency rule', () => {
    const r = cruise(['schemas', 'solver', 'worker', 'coordinator', 'bench']);
    expect(r.summary.totalCruised).toBeGreaterThan(100);
    expect(r.summary.violations.map((v) => `${v.rule.name}: ${v.from} → ${v.to}`)).toEqual([]);
  });

  it('when a small tree breaks each rule once then the linter names every broken rule (the rules can fail)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'loamwave-layout-'));
    try {
      const file = (path: string, text: string) => {
        mkdirSync(join(dir, path, '..'), { recursive: true });
        writeFileSync(join(dir, path), text);
      };
      file('tsconfig.json', JSON.stringify({ compilerOptions: { module: 'NodeNext', moduleResolution: 'NodeNext' } }));
      file('coordinator/commands/run.ts', "export const run = 1;\n");
      file('coordinator/sweep/plan.ts', "import { run } from '../commands/run.js';\nimport { table } from '../outputs/tables.js';\nexport const plan = run + table;\n");
      file('coordinator/outputs/tables.ts', "import { page } from '../report/write.js';\nexport const table = page;\n");
      file('coordinator/report/write.ts', "export const page = 2;\n");
      file('solver/index.ts', "import { readFileSync } from 'node:fs';\nimport { plan } from '../coordinator/sweep/plan.js';\nexport const s = [readFileSync, plan];\n");
      file('schemas/case.ts', "import { s } from '../solver/index.js';\nexport const c = s;\n");
      const r = cruise(['schemas', 'solver', 'coordinator'], dir);
      expect([...new Set(r.summary.violations.map((v) => v.rule.name))].sort()).toEqual([
        'lower-tier-imports-no-upper',
        'nothing-imports-commands',
        'outputs-never-writes-the-report',
        'schemas-import-nothing-of-ours',
        'solver-above-schemas-only',
        'solver-does-no-io',
      ]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
