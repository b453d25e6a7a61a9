// The solver against published references: every check of `loamwave verify`, asserted.
// Each check names its source beside the comparison and carries the reason for its tolerance (solver/verify/).
import { describe, expect, it } from 'vitest';
import { referenceChecks } from '../solver/verify/index.js';

describe('solver reference checks (the `loamwave verify` table)', () => {
  for (const check of referenceChecks()) {
    it(`when ${check.id} runs then every comparison is within its tolerance, and the tolerance says why`, () => {
      const outcomes = check.run();
      expect(outcomes.length).toBeGreaterThan(0);
      for (const o of outcomes) {
        // printed so a failure shows input, value, expected, difference and tolerance
        const line = `${o.check}: expected ${o.expected}, got ${o.got}, difference ${o.gotValue - o.expectedValue}, tolerance ${o.tolerance} (${o.toleranceReason}) [${o.source}]`;
        console.log(line);
        expect(o.pass, line).toBe(true);
        expect(o.toleranceReason.trim().length, `${o.check}: no tolerance reason`).toBeGreaterThan(0);
      }
    });
  }
});
