// What every sweep command does first: read and validate the sweep, expand it (every case checked before any
// file is written), open the ledger in the output folder and add the jobs it does not hold yet, and estimate
// each job's cost (for longest-first order, queue priorities and a cost-weighted ETA).
import { basename, join, resolve } from 'node:path';
import type { Sweep } from '../../schemas/sweep.js';
import { estimateCost, type SolveLimits } from '../../solver/index.js';
import { Ledger, type LedgerJob } from './ledger.js';
import { loadSweep } from '../sweep/file.js';
import { expandSweep, type ExpandedJob } from '../sweep/expand.js';

export interface SweepRun {
  readonly sweep: Sweep;
  /** The sweep file as read (copied into the outputs). */
  readonly text: string;
  readonly path: string;
  readonly outDir: string;
  readonly ledger: Ledger;
  readonly jobs: readonly ExpandedJob[];
  /** Jobs the ledger did not hold before. */
  readonly added: number;
  /** Estimated cell updates of each job (estimateCost), by job id. */
  readonly costById: ReadonlyMap<string, number>;
}

/** The output folder: `--out DIR`, else `out/<sweep name>/` under the current folder. */
export function outDirFor(sweep: Sweep, outOption?: string): string {
  return resolve(outOption ?? join('out', sweep.name));
}

/** A validated, expanded sweep whose output folder has not been touched yet. */
export type PreparedSweep = Omit<SweepRun, 'ledger' | 'added'>;

/**
 * Load and expand a sweep and estimate its jobs; writes nothing (a bad sweep or case, or a job over the memory cap
 * in `limits`, throws UserError).
 */
export function prepareSweep(sweepPath: string, outOption?: string, limits: SolveLimits = {}): PreparedSweep {
  const { sweep, text, path } = loadSweep(sweepPath);
  const jobs = expandSweep(sweep, basename(path), limits);
  const costById = new Map<string, number>();
  for (const j of jobs) costById.set(j.job_id, estimateCost(j.case).cell_updates);
  return { sweep, text, path, outDir: outDirFor(sweep, outOption), jobs, costById };
}

/** Open (or create) the ledger of a prepared sweep and add the jobs it does not hold yet. */
export function openLedgerFor(prepared: PreparedSweep): SweepRun {
  const ledger = Ledger.open(prepared.outDir);
  let added: number;
  try {
    added = ledger.addJobs(prepared.jobs);
  } catch (e) {
    ledger.close();
    throw e;
  }
  return { ...prepared, ledger, added };
}

/** Load, expand and register a sweep; nothing is written unless the sweep and all its cases are valid. */
export function openSweepRun(sweepPath: string, outOption?: string, limits: SolveLimits = {}): SweepRun {
  return openLedgerFor(prepareSweep(sweepPath, outOption, limits));
}

/** Open the ledger of a sweep that has been run or submitted before, without changing it (for `status`). */
export function openExistingSweep(sweepPath: string, outOption?: string): { sweep: Sweep; outDir: string } {
  const { sweep } = loadSweep(sweepPath);
  return { sweep, outDir: outDirFor(sweep, outOption) };
}

/** Jobs ordered longest first by estimated cost; ties keep expansion order. */
export function longestFirst(jobs: readonly LedgerJob[], costById: ReadonlyMap<string, number>): LedgerJob[] {
  return [...jobs].sort((a, b) => (costById.get(b.job_id) ?? 0) - (costById.get(a.job_id) ?? 0) || a.index - b.index);
}
