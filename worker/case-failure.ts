// Why a case did not produce a result, as a typed value that survives a thread or queue boundary.
// `retryable` decides whether a queue retries the job: deterministic failures (an invalid or oversized case,
// a diverged run) fail the same way every time, so they are never retried.
import { z } from 'zod';

/** Every way a case can fail, and whether running it again could help. */
export const FAILURE_KINDS = {
  /** The case does not pass the case schema. */
  invalid_case: { retryable: false },
  /** The case needs more memory than this worker allows (estimateCost). */
  too_large: { retryable: false },
  /** The run produced non-finite numbers (NaN or Infinity): unstable or diverged. */
  diverged: { retryable: false },
  /** The run was stopped on request (Ctrl-C, shutdown); the job is handed back, not failed. */
  cancelled: { retryable: true },
  /** The thread or process running the case died (out of memory, killed). */
  crashed: { retryable: true },
  /** Any other exception inside the solver: a programming error, retried a bounded number of times. */
  internal: { retryable: true },
} as const;

export const FailureKindSchema = z.enum(
  Object.keys(FAILURE_KINDS) as [keyof typeof FAILURE_KINDS, ...(keyof typeof FAILURE_KINDS)[]],
);
export type FailureKind = z.infer<typeof FailureKindSchema>;

/** The wire form of a failure (a structured-clone or JSON message). */
export const FailureWireSchema = z.strictObject({ kind: FailureKindSchema, message: z.string() });
export type FailureWire = z.infer<typeof FailureWireSchema>;

export class CaseFailure extends Error {
  readonly kind: FailureKind;
  constructor(kind: FailureKind, message: string) {
    super(message);
    this.name = 'CaseFailure';
    this.kind = kind;
  }

  /** Whether running the same case again could give a result. */
  get retryable(): boolean {
    return FAILURE_KINDS[this.kind].retryable;
  }

  /** `diverged: ...`, the reason recorded in the ledger and in the queue. */
  get reason(): string {
    return `${this.kind}: ${this.message}`;
  }

  toWire(): FailureWire {
    return { kind: this.kind, message: this.message };
  }

  static fromWire(wire: unknown): CaseFailure {
    const w = FailureWireSchema.safeParse(wire);
    if (!w.success) return new CaseFailure('internal', `unreadable failure message ${JSON.stringify(wire)}`);
    return new CaseFailure(w.data.kind, w.data.message);
  }
}
