// The local pool: cases solved in worker threads give the same numbers as in process, progress arrives while
// a case runs, a stop request ends a running case promptly, and a thread that dies fails only its own case.
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseInput } from '../schemas/case.js';
import { CaseFailure } from '../worker/case-failure.js';
import { runCase } from '../worker/run-case.js';
import { SolverPool } from '../worker/thread-pool.js';
import { ensureCompiled } from './helpers/compiled.js';

const caseAt = (cellsPerWavelength: number, conductivity = 0.01): CaseInput => ({
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: conductivity, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: cellsPerWavelength },
  receivers: { ranges_m: [10000, 30000, 50000] },
});

const withoutWallTime = ({ wall_time_s: _w, ...rest }: { wall_time_s: number }) => rest;

async function failureOf(p: Promise<unknown>): Promise<CaseFailure> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(CaseFailure);
    return e as CaseFailure;
  }
  throw new Error('expected the case to fail');
}

let scratch: string;
beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-pool-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('SolverPool', () => {
  it('when three cases run on two threads then each result equals the in-process run bit for bit', async () => {
    const pool = new SolverPool({ threads: 2 });
    try {
      const cases = [caseAt(8, 0.01), caseAt(8, 0.003), caseAt(10, 0.03)];
      const results = await Promise.all(cases.map((c, i) => pool.run(c, `job-${i}`)));
      expect(pool.solvesStarted).toBe(3);
      // Structured clone (HTML Living Standard, StructuredSerializeInternal) copies a Number primitive as is,
      // so the thread's doubles arrive unchanged; toStrictEqual compares with Object.is semantics for numbers.
      results.forEach((r, i) => {
        expect(r.job_id).toBe(`job-${i}`);
        expect(withoutWallTime(r)).toStrictEqual(withoutWallTime(runCase(cases[i], `job-${i}`)));
      });
    } finally {
      await pool.close();
    }
  });

  it('when a case runs for a while then progress arrives on the main thread and grows', async () => {
    const pool = new SolverPool({ threads: 1 });
    try {
      const seen: number[] = [];
      await pool.run(caseAt(40), 'job-slow', (f) => seen.push(f));
      // The thread sends progress at most every 200 ms; this case takes about 0.7 s alone on this machine.
      expect(seen.length).toBeGreaterThan(0);
      for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    } finally {
      await pool.close();
    }
  });

  it('when a running case is asked to stop then it fails as cancelled and the thread takes the next case', async () => {
    const pool = new SolverPool({ threads: 1 });
    try {
      let stopped = false;
      const slow = pool.run(caseAt(60), 'job-stop', () => {
        if (!stopped) {
          stopped = true;
          pool.stopRunning();
        }
      });
      const f = await failureOf(slow);
      expect(f.kind).toBe('cancelled');
      const next = await pool.run(caseAt(8), 'job-next');
      expect(next.job_id).toBe('job-next');
    } finally {
      await pool.close();
    }
  });

  it('when a case is larger than the memory cap then it fails as too_large without a solve', async () => {
    const pool = new SolverPool({ threads: 1, maxMemoryBytes: 1024 });
    try {
      const f = await failureOf(pool.run(caseAt(8), 'job-big'));
      expect(f.kind).toBe('too_large');
      expect(f.retryable).toBe(false);
    } finally {
      await pool.close();
    }
  });

  it('when a solver thread dies then its case fails as crashed and a fresh thread is started', async () => {
    // A stand-in thread entry that dies on its first case, like a thread killed by the operating system.
    const entry = join(scratch, 'dying-thread.mjs');
    writeFileSync(entry, "import { parentPort } from 'node:worker_threads';\nparentPort.on('message', () => process.exit(9));\n");
    const pool = new SolverPool({ threads: 1, threadEntry: pathToFileURL(entry) });
    try {
      const f = await failureOf(pool.run(caseAt(8), 'job-crash'));
      expect(f.kind).toBe('crashed');
      expect(f.message).toContain('code 9');
      const again = await failureOf(pool.run(caseAt(8), 'job-crash-2'));
      expect(again.kind).toBe('crashed');
    } finally {
      await pool.close();
    }
  });

  it('when the pool is closed twice then the second close is harmless and new cases are refused', async () => {
    const pool = new SolverPool({ threads: 1 });
    await pool.close();
    await pool.close();
    expect((await failureOf(pool.run(caseAt(8), 'late'))).kind).toBe('cancelled');
  });
});
