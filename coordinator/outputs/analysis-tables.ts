// convergence.parquet and sensitivity.parquet: the analysis tables of a sweep, computed from the runs
// and fields tables just written (read back through the report's folder reader, so the files and the report agree),
// with Parquet columns derived from the row schemas, which are the contract. The report page is not written here:
// the command layer writes it, once, from these same tables.
import { renameSync } from 'node:fs';
import { join } from 'node:path';
import { z } from 'zod';
import { ConvergenceRowSchema } from '../../schemas/analysis-rows.js';
import { SensitivityRowSchema } from '../../schemas/analysis-rows.js';
import { columnsFromRowSchema } from './columns.js';
import { ParquetTableWriter, type CellValue } from './parquet.js';
import { computeConvergence, computeSensitivity } from '../analysis/compute-tables.js';
import { readReportFolder } from '../analysis/read-tables.js';
import { SOLVER_VERSION } from '../../solver/version.js';

/** Write rows of a flat row schema to one Parquet file; non-finite numbers become null where the schema allows null. */
export async function writeRowTable(path: string, schema: z.ZodObject, rows: readonly object[]): Promise<number> {
  const columns = columnsFromRowSchema(schema);
  const w = await ParquetTableWriter.open(path, columns);
  try {
    for (const row of rows) {
      const r = row as Record<string, CellValue>;
      const out: Record<string, CellValue> = {};
      for (const c of columns) {
        const v = r[c.name];
        out[c.name] = c.nullable && typeof v === 'number' && !Number.isFinite(v) ? null : v;
      }
      await w.append(out);
    }
  } finally {
    await w.close();
  }
  return rows.length;
}

export const ANALYSIS_FILES = { convergence: 'convergence.parquet', sensitivity: 'sensitivity.parquet' } as const;

/**
 * Compute convergence.parquet (and sensitivity.parquet when `sensitivity` is set) from the tables published in
 * `dir` (runs.parquet, fields/ and the sweep copy), write them under `stagingDir` and rename them into `dir`.
 */
export async function writeAnalysisTables(
  dir: string,
  stagingDir: string,
  options: { sensitivity?: boolean } = {},
): Promise<{ convergence: number; sensitivity: number | null }> {
  const tables = await readReportFolder(dir);
  const convergence = computeConvergence(tables, { generatedBy: `loamwave ${SOLVER_VERSION}` });
  const counts = {
    convergence: await writeRowTable(join(stagingDir, ANALYSIS_FILES.convergence), ConvergenceRowSchema, convergence),
    sensitivity: options.sensitivity
      ? await writeRowTable(join(stagingDir, ANALYSIS_FILES.sensitivity), SensitivityRowSchema, computeSensitivity(tables, { warnings: [] }))
      : null,
  };
  renameSync(join(stagingDir, ANALYSIS_FILES.convergence), join(dir, ANALYSIS_FILES.convergence));
  if (counts.sensitivity !== null) renameSync(join(stagingDir, ANALYSIS_FILES.sensitivity), join(dir, ANALYSIS_FILES.sensitivity));
  return counts;
}
