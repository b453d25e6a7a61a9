// The solver against published references: every check of `loamwave verify`, asserted.
// Each check names its source beside the comparison and carries the reason for its tolerance (solver/verify/).
import { describe, expect, it } from 'vitest';
import { withFieldPrecision, type FieldPrecision } from '../solver/verify/check-case.js';
import { referenceChecks } from '../solver/verify/index.js';

// float64 is the default; float32 (grid.field_precision) must pass every check too (`npm run bench:precision`
// prints by how much each value moves)
describe.each<FieldPrecision>(['float64', 'float32'])('solver reference checks (the `loamwave verify` table), %s fields', (precision) => {
  for (const check of referenceChecks()) {
    it(`when ${check.id} runs then every comparison is within its tolerance, and the tolerance says why`, () => {
      const outcomes = withFieldPrecision(precision, () => check.run());
      expect(outcomes.length).toBeGreaterThan(0);
      for (const o of outcomes) {
        // printed so a failure shows input, value, expected, difference and tolerance
        const line = `${precision}: ${o.check}: expected ${o.expected}, got ${o.got}, difference ${o.gotValue - o.expectedValue}, tolerance ${o.tolerance} (${o.toleranceReason}) [${o.source}]`;
        console.log(line);
        expect(o.pass, line).toBe(true);
        expect(o.toleranceReason.trim().length, `${o.check}: no tolerance reason`).toBeGreaterThan(0);
      }
    });
  }
});
