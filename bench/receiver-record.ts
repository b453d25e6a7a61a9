// Writes solve()'s receiver results for the receiver equivalence cases as JSON (numbers printed in full, so they
// read back as the same doubles): `node dist/bench/receiver-record.js > test/fixtures/receivers-before.json`.
// The file in test/fixtures was written by the implementation before the shared-sample DFT (one running DFT per
// tap), and test/solver.receivers.test.ts compares today's solve() with it.
import { solve } from '../solver/index.js';
import { equivalenceCases } from './receiver-cases.js';

const out: Record<string, { steps: number; settling_change: number; receivers: unknown[] }> = {};
for (const [name, c] of equivalenceCases()) {
  const r = solve(c);
  out[name] = {
    steps: r.grid.steps,
    settling_change: r.grid.settling_change,
    receivers: r.receivers.map((x) => ({ range_m: x.range_m, ez: x.ez, e_horizontal: x.e_horizontal, h: x.h })),
  };
  process.stderr.write(`${name}: ${r.grid.cells_range}×${r.grid.cells_height} cells, ${r.grid.steps} steps\n`);
}
process.stdout.write(JSON.stringify(out, null, 1) + '\n');
