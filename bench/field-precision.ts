// `npm run bench:precision`: every published-reference check of `loamwave verify`, run with the fields stored in
// float64 (the default) and in float32 (grid.field_precision), side by side: the value each check measured, how
// far float32 moved it, and whether it still passes within the check's own tolerance. A benchmark, not a test:
// test/solver.references.test.ts asserts the float32 run passes; this prints by how much each value moves.
import { Command } from 'commander';
import { referenceChecks, type CheckOutcome } from '../solver/verify/index.js';
import { withFieldPrecision } from '../solver/verify/check-case.js';

interface Row {
  /** The reference check (`loamwave verify --only` id) the outcome belongs to. */
  id: string;
  check: string;
  expected: number;
  got64: number;
  got32: number;
  moved: number;
  tolerance: number;
  pass64: boolean;
  pass32: boolean;
}

function main(): void {
  const program = new Command('field-precision')
    .description('the reference checks with float64 and with float32 fields, side by side')
    .option('--json', 'print the rows as JSON on stdout')
    .option('--only <ids>', 'comma-separated check ids to run')
    .parse();
  const opts = program.opts<{ json?: boolean; only?: string }>();
  const wanted = opts.only?.split(',').map((s) => s.trim());
  const rows: Row[] = [];
  const seconds = { float64: 0, float32: 0 };
  for (const check of referenceChecks()) {
    if (wanted && !wanted.includes(check.id)) continue;
    process.stderr.write(`  ${check.id}…\n`);
    let t0 = performance.now();
    const a: CheckOutcome[] = withFieldPrecision('float64', () => check.run());
    seconds.float64 += (performance.now() - t0) / 1000;
    t0 = performance.now();
    const b: CheckOutcome[] = withFieldPrecision('float32', () => check.run());
    seconds.float32 += (performance.now() - t0) / 1000;
    a.forEach((o, q) => {
      const p = b[q];
      if (!p || p.check !== o.check) throw new Error(`field-precision: ${check.id} gave different outcomes in float32`);
      rows.push({ id: check.id, check: o.check, expected: o.expectedValue, got64: o.gotValue, got32: p.gotValue, moved: p.gotValue - o.gotValue, tolerance: o.toleranceValue, pass64: o.pass, pass32: p.pass });
    });
  }
  if (opts.json) {
    process.stdout.write(JSON.stringify({ date: new Date().toISOString(), node: process.version, seconds, rows }, null, 2) + '\n');
    return;
  }
  const g = (x: number): string => (Number.isFinite(x) ? x.toPrecision(6) : String(x));
  process.stdout.write(`loamwave field-precision comparison, ${new Date().toISOString()}, node ${process.version}\n`);
  process.stdout.write('each reference check with float64 and with float32 fields; moved = float32 − float64, in the unit of the check\n\n');
  // a bound check (an upper bound, no tolerance: the absorbing layers' reflection) shows its margin instead
  const isBound = (r: Row): boolean => r.tolerance === 0;
  for (const r of rows) {
    const judged = isBound(r)
      ? `a bound: float32 stays ${g(r.expected - r.got32)} below it`
      : `tolerance ${g(r.tolerance)}, |moved| / tolerance ${(Math.abs(r.moved) / r.tolerance).toExponential(1)}`;
    process.stdout.write(
      `${r.pass32 ? 'pass' : 'FAIL'}  ${r.check}\n      expected ${g(r.expected)}  float64 ${g(r.got64)}  float32 ${g(r.got32)}  moved ${r.moved.toExponential(2)}  (${judged})\n`,
    );
  }
  const worst = rows.filter((r) => !isBound(r)).reduce((m, r) => Math.max(m, Math.abs(r.moved) / r.tolerance), 0);
  process.stdout.write('\nby check (largest |moved| in the unit of its outcome; bounds: the smallest margin left in float32):\n');
  for (const id of [...new Set(rows.map((r) => r.id))]) {
    const mine = rows.filter((r) => r.id === id);
    const judged = mine.filter((r) => !isBound(r));
    const bounds = mine.filter(isBound);
    const parts = [`${mine.length} outcome${mine.length === 1 ? '' : 's'}, ${mine.filter((r) => r.pass32).length} pass in float32`];
    if (judged.length) {
      const big = judged.reduce((a, r) => (Math.abs(r.moved) > Math.abs(a.moved) ? r : a));
      parts.push(`largest |moved| ${Math.abs(big.moved).toExponential(1)} (${(Math.abs(big.moved) / big.tolerance).toExponential(1)} of its tolerance ${g(big.tolerance)})`);
    }
    if (bounds.length) parts.push(`bound margin ${g(Math.min(...bounds.map((r) => r.expected - r.got32)))} (float64 ${g(Math.min(...bounds.map((r) => r.expected - r.got64)))})`);
    process.stdout.write(`  ${id}: ${parts.join('; ')}\n`);
  }
  process.stdout.write(
    `\n${rows.filter((r) => r.pass32).length} of ${rows.length} pass with float32 (${rows.filter((r) => r.pass64).length} with float64); ` +
      `largest |moved| / tolerance ${worst.toExponential(1)} (bounds left out); run time float64 ${seconds.float64.toFixed(1)} s, float32 ${seconds.float32.toFixed(1)} s\n`,
  );
}

main();
