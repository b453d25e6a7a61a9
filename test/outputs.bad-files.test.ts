// Output-folder files that are corrupt or belong to another program: each gives one line naming the file and the
// fix, exit code 2 (a mistake in the input, schemas/exit-codes.ts), and leaves the file as it was.
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCliSync } from './helpers/cli-process.js';
import { ensureCompiled, PROJECT_ROOT } from './helpers/compiled.js';

const SWEEP = join(PROJECT_ROOT, 'examples', 'quorvessin-vlf-coast.yaml');
let scratch: string;
beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-badfiles-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function expectOneLine(r: { code: number | null; stderr: string }, file: string): void {
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trim().split('\n');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^error: /);
  expect(lines[0]).toContain(file);
  expect(r.stderr).not.toMatch(/\n\s+at /);
}

describe('corrupt or foreign files in an output folder', () => {
  it('when runs.parquet is not Parquet then report names it and exits 2', () => {
    const dir = join(scratch, 'corrupt-runs');
    mkdirSync(dir);
    copyFileSync(SWEEP, join(dir, 'sweep.yaml'));
    writeFileSync(join(dir, 'runs.parquet'), 'PAR1 this is not a table\n'.repeat(20));
    const r = runCliSync(['report', dir], scratch);
    expectOneLine(r, 'runs.parquet');
    expect(r.stderr).toContain('loamwave run or loamwave collect');
  });

  it('when ledger.sqlite is not a database then status and run name it and exit 2, and the file is untouched', () => {
    const dir = join(scratch, 'corrupt-ledger');
    mkdirSync(dir);
    const junk = Buffer.from('this is not an SQLite database, just bytes\n'.repeat(200));
    writeFileSync(join(dir, 'ledger.sqlite'), junk);
    expectOneLine(runCliSync(['status', SWEEP, '--out', dir], scratch), 'ledger.sqlite');
    expectOneLine(runCliSync(['run', SWEEP, '--out', dir, '--no-report'], scratch), 'ledger.sqlite');
    expect(readFileSync(join(dir, 'ledger.sqlite')).equals(junk)).toBe(true);
  });

  it('when ledger.sqlite is another program\'s SQLite file then run refuses it and adds nothing to it', () => {
    const dir = join(scratch, 'foreign-ledger');
    mkdirSync(dir);
    const db = new Database(join(dir, 'ledger.sqlite'));
    db.exec('CREATE TABLE photos (id INTEGER PRIMARY KEY, caption TEXT)');
    db.close();
    const r = runCliSync(['run', SWEEP, '--out', dir, '--no-report'], scratch);
    expectOneLine(r, 'not a Loamwave ledger');
    const check = new Database(join(dir, 'ledger.sqlite'), { readonly: true });
    const tables = check.prepare(`SELECT name FROM sqlite_master WHERE type = 'table'`).all() as Array<{ name: string }>;
    check.close();
    expect(tables.map((t) => t.name)).toEqual(['photos']);
  });
});
