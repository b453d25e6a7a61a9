// The cases of the reference checks, validated, with the field storage the checks run at: float64 unless
// `loamwave verify --fields float32` (or a test) asks for grid.field_precision float32 around a run.
import { parseCase, type Case, type CaseInput } from '../../schemas/case.js';

export type FieldPrecision = 'float64' | 'float32';

let precision: FieldPrecision = 'float64';

/** Run `fn` with every check case's fields stored in `p`; the previous setting is restored afterwards. */
export function withFieldPrecision<T>(p: FieldPrecision, fn: () => T): T {
  const before = precision;
  precision = p;
  try {
    return fn();
  } finally {
    precision = before;
  }
}

/** A check's case, validated, at the field precision of the run (see withFieldPrecision). */
export function checkCase(input: CaseInput): Case {
  return parseCase({ ...input, grid: { ...(input.grid ?? {}), field_precision: precision } });
}
