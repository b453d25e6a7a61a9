// Prints, per small bench case, the SHA-256 of JSON.stringify(solve(case)) and the demo case's too, so a kernel
// change can be checked bit-identical: `node dist/bench/solve-fingerprint.js > before.json`, change, run again,
// `node dist/bench/solve-fingerprint.js --compare before.json` (exit 1 on any difference).
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { solve } from '../solver/index.js';
import { demoCase, fingerprintCases } from './bench-cases.js';

function fingerprints(withDemo: boolean): Record<string, { sha256: string; steps: number; cells: number }> {
  const out: Record<string, { sha256: string; steps: number; cells: number }> = {};
  const cases = fingerprintCases();
  if (withDemo) cases.push(['demo: Brackenholt beacon 20 kHz', demoCase()]);
  for (const [name, c] of cases) {
    const r = solve(c);
    out[name] = { sha256: createHash('sha256').update(JSON.stringify(r)).digest('hex'), steps: r.grid.steps, cells: r.grid.cells_total };
    process.stderr.write(`${name}: ${r.grid.cells_total} cells, ${r.grid.steps} steps\n`);
  }
  return out;
}

const argv = process.argv.slice(2);
const compareAt = argv.indexOf('--compare');
const now = fingerprints(!argv.includes('--no-demo'));
if (compareAt < 0) {
  process.stdout.write(JSON.stringify(now, null, 2) + '\n');
} else {
  const file = argv[compareAt + 1];
  if (!file) {
    process.stderr.write('error: --compare needs the file written by an earlier run\n');
    process.exit(2);
  }
  const before = JSON.parse(readFileSync(file, 'utf8')) as typeof now;
  let differ = 0;
  for (const [name, fp] of Object.entries(now)) {
    const was = before[name]?.sha256;
    const same = was === fp.sha256;
    if (!same) differ++;
    process.stdout.write(`${same ? 'identical' : was ? 'DIFFERENT' : 'new      '}  ${name}\n`);
  }
  process.exit(differ > 0 ? 1 : 0);
}
