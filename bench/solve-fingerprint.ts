// Prints, per case, the SHA-256 of JSON.stringify(solve(case)), so a kernel change can be checked bit-identical:
//   node dist/bench/solve-fingerprint.js [CASE.json …] > before.json      (the bench's small cases, the demo, files)
//   … change the kernel, rebuild …
//   node dist/bench/solve-fingerprint.js [CASE.json …] --compare before.json   (exit 1 on any difference)
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { parseCase, type Case } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { solve } from '../solver/index.js';
import { demoCase, fingerprintCases } from './bench-cases.js';

interface Fingerprint {
  sha256: string;
  steps: number;
  cells: number;
}

function readCaseFile(path: string): Case {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new UserError(`${path}: cannot read the case file; check the path`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new UserError(`${path}: not valid JSON (${(e as Error).message})`);
  }
  return parseCase(json, path);
}

function fingerprints(cases: Array<[string, Case]>): Record<string, Fingerprint> {
  const out: Record<string, Fingerprint> = {};
  for (const [name, c] of cases) {
    const r = solve(c);
    out[name] = { sha256: createHash('sha256').update(JSON.stringify(r)).digest('hex'), steps: r.grid.steps, cells: r.grid.cells_total };
    process.stderr.write(`${name}: ${r.grid.cells_total} cells, ${r.grid.steps} steps\n`);
  }
  return out;
}

function main(argv: string[]): number {
  let compareFile: string | undefined;
  let withDemo = true;
  const files: string[] = [];
  for (let a = 0; a < argv.length; a++) {
    if (argv[a] === '--compare') {
      compareFile = argv[++a];
      if (!compareFile) throw new UserError('--compare: needs the file written by an earlier run, e.g. --compare before.json');
    } else if (argv[a] === '--no-demo') withDemo = false;
    else if (argv[a].startsWith('--')) throw new UserError(`unknown option ${argv[a]}; use --compare FILE, --no-demo or case file paths`);
    else files.push(argv[a]);
  }
  const before = compareFile ? (JSON.parse(readFileSync(compareFile, 'utf8')) as Record<string, Fingerprint>) : undefined;
  const cases = fingerprintCases();
  if (withDemo) cases.push(['demo: Dravelquine VLF transmitter 20 kHz', demoCase()]);
  for (const f of files) cases.push([f, readCaseFile(f)]);
  const now = fingerprints(cases);
  if (!before) {
    process.stdout.write(JSON.stringify(now, null, 2) + '\n');
    return 0;
  }
  let differ = 0;
  for (const [name, fp] of Object.entries(now)) {
    const was = before[name]?.sha256;
    if (was !== fp.sha256) differ++;
    process.stdout.write(`${was === fp.sha256 ? 'identical' : was ? 'DIFFERENT' : 'not in the earlier file'}  ${name}\n`);
  }
  return differ > 0 ? 1 : 0;
}

try {
  process.exitCode = main(process.argv.slice(2));
} catch (e) {
  if (!(e instanceof UserError)) throw e;
  process.stderr.write(`error: ${e.message}\n`);
  process.exitCode = e.exitCode;
}
