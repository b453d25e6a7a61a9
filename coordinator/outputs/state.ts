// What the output folder was written from: the ledger's revision, the sweep text and the solver version, in a small
// JSON file beside the tables. A rerun whose ledger, sweep and solver are unchanged finds the tables current and
// writes nothing; the report records the revision it was drawn from the same way. Written last, by rename, so a
// crash mid-write leaves either the old state (and the tables are rewritten next time) or the new one.
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { SOLVER_VERSION } from '../../solver/version.js';

export const OUTPUT_STATE_FILE = '.loamwave-outputs.json';
const STATE_FORMAT = 1;

export interface OutputState {
  format: number;
  /** Ledger revision the tables were written from. */
  ledger_revision: number;
  /** SHA-256 of the sweep file's text. */
  sweep_sha256: string;
  solver_version: string;
  /** Ledger revision report.html was drawn from (null: no report written from these tables). */
  report_revision: number | null;
}

export function sweepDigest(sweepText: string): string {
  return createHash('sha256').update(sweepText).digest('hex');
}

/** The recorded state, or null when there is none or it is unreadable (then everything is rewritten). */
export function readOutputState(outDir: string): OutputState | null {
  const path = join(outDir, OUTPUT_STATE_FILE);
  if (!existsSync(path)) return null;
  try {
    const s = JSON.parse(readFileSync(path, 'utf8')) as OutputState;
    return s.format === STATE_FORMAT && Number.isInteger(s.ledger_revision) ? s : null;
  } catch {
    return null;
  }
}

export function writeOutputState(outDir: string, state: Omit<OutputState, 'format'>): void {
  const path = join(outDir, OUTPUT_STATE_FILE);
  const tmp = `${path}.${process.pid}.tmp`;
  writeFileSync(tmp, JSON.stringify({ format: STATE_FORMAT, ...state }) + '\n');
  renameSync(tmp, path);
}

/** Whether the tables in `outDir` were written from exactly this ledger revision, sweep text and solver. */
export function tablesCurrent(state: OutputState | null, ledgerRevision: number, sweepText: string, files: readonly string[], outDir: string): boolean {
  return (
    state !== null &&
    state.ledger_revision === ledgerRevision &&
    state.sweep_sha256 === sweepDigest(sweepText) &&
    state.solver_version === SOLVER_VERSION &&
    files.every((f) => existsSync(join(outDir, f)))
  );
}
