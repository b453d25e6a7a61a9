// The report's data from an output folder, out of core: the runs and sensitivity tables are read whole (one row a
// job, one a sensitivity index), the convergence table as a digest (its first rows, counts and the plotted rows),
// and the field rows streamed once, job by job as the files hold them, into the spread's bounded summary. Memory is
// bounded by the number of jobs and plotted ranges, not by the field rows (except for the flat-against-sphere pairs
// of a sweep that varies the geometry, whose receivers are held).
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { ConvergenceRow } from '../../schemas/analysis-rows.js';
import { computeConvergenceOutOfCore, computeSensitivityOutOfCore, type AnalysisOptions, type Notes } from '../analysis/compute-tables.js';
import { convergenceDigestOf, readConvergenceDigest } from '../analysis/convergence-digest.js';
import { FieldSpreadBuilder, pointColumnsOf, type PointColumns } from '../analysis/field-spread.js';
import { openFieldReader, readReportFolder, REPORT_INPUTS } from '../analysis/read-tables.js';
import { assembleFromParts, curvatureOf, DIGEST_LIMITS, needsCurvature, reportInputs, spreadRunsOf } from './assembly.js';
import type { ReportData } from './data.js';

/** The report's data for the output folder `dir` (DuckDB spills to a scratch folder inside it, removed after). */
export async function assembleReportFromFolder(dir: string, options: AnalysisOptions): Promise<ReportData> {
  const tables = await readReportFolder(dir, { fields: false, convergence: false });
  const scratch = mkdtempSync(join(dir, '.loamwave-report-'));
  try {
    const reader = await openFieldReader(dir, scratch);
    try {
      const notes: Notes = { warnings: [] };
      const convergencePath = join(dir, REPORT_INPUTS.convergence);
      let digest;
      if (existsSync(convergencePath)) digest = await readConvergenceDigest(convergencePath, DIGEST_LIMITS, scratch);
      else {
        // a folder without the table (written without the analysis): computed here, as the outputs would
        const byGroup: Array<[number, readonly ConvergenceRow[]]> = [];
        await computeConvergenceOutOfCore(tables, reader, options, async (rows, g) => void byGroup.push([g, rows]));
        digest = convergenceDigestOf(byGroup.sort((a, b) => a[0] - b[0]).flatMap(([, rows]) => rows), DIGEST_LIMITS);
      }
      const sensitivity = tables.sensitivity ?? (await computeSensitivityOutOfCore(tables, reader, notes));
      const runs = spreadRunsOf(tables, new Set((await reader.rowsPerJob()).keys()));
      const position = new Map(runs.map((r, k) => [r.job_id, k]));
      const spread = new FieldSpreadBuilder(runs, await reader.distinctRanges(), reportInputs(tables));
      const kept = needsCurvature(tables.sweep) ? new Map<string, PointColumns>() : null;
      for await (const { job_id, points } of reader.inFileOrder()) {
        const k = position.get(job_id);
        if (k === undefined) continue;
        const cols = pointColumnsOf(points);
        spread.add(k, cols);
        kept?.set(job_id, cols);
      }
      const curvature = kept ? curvatureOf(tables, runs.filter((r) => kept.has(r.job_id)).map((r) => ({ ...r, points: kept.get(r.job_id)! }))) : [];
      return assembleFromParts(tables, { convergence: digest, sensitivity, fields: spread.finish(), curvature }, notes, options);
    } finally {
      reader.close();
    }
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}
