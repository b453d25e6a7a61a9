// How big the report of a large sweep gets and how long it takes to build and to open: the made-up tables of
// bench/large-sweep-tables.ts (2,000 runs × 500 receivers) through assembleReportData and buildReportHtml, the page
// written to a temporary folder and opened in Debian's /usr/bin/chromium (headless, through playwright-core).
// Targets: report.html ≤ 5 MB and the page's 'load' event ≤ 3 s. Prints one line per measure, or --json.
// The same tables are also written as an output folder (bench/report-folder.ts) and `loamwave report`'s build is
// timed on it in a child process, whose peak RSS is printed.
// Run with `npm run bench:report`. Times are wall clock on whatever machine runs it; the load time is the median of
// three fresh pages, after one page to warm the browser.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { assembleReportData } from '../coordinator/report/assembly.js';
import { buildReportHtml } from '../coordinator/report/html.js';
import { largeSweepTables } from './large-sweep-tables.js';
import { buildReportInChild, writeReportFolder } from './report-folder.js';

/** The targets the report must meet for any sweep size (the bench reports against them). */
export const REPORT_TARGETS = { maxBytes: 5 * 1024 * 1024, maxLoadS: 3 } as const;

export interface ReportSizeResult {
  runs: number;
  receivers: number;
  bytes: number;
  /** Seconds to make the page from the tables: assembly (quantiles included) and HTML with every plot rendered. */
  assembleS: number;
  buildHtmlS: number;
  /** Median seconds from navigation to the page's 'load' event over `loads` fresh pages. */
  loadS: number;
  loads: number[];
  /** `loamwave report` on the same tables written as an output folder, in a child process: seconds and peak RSS, bytes. */
  folderBuildS: number;
  folderPeakRssBytes: number;
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function seconds(t0: bigint): number {
  return Number(process.hrtime.bigint() - t0) / 1e9;
}

export async function measureReportSize(loads = 3): Promise<ReportSizeResult> {
  const tables = largeSweepTables();
  let t0 = process.hrtime.bigint();
  const data = assembleReportData(tables, { generatedBy: 'loamwave bench' });
  const assembleS = seconds(t0);
  t0 = process.hrtime.bigint();
  const html = await buildReportHtml(data);
  const buildHtmlS = seconds(t0);
  const dir = mkdtempSync(join(tmpdir(), 'loamwave-report-bench-'));
  const file = join(dir, 'report.html');
  writeFileSync(file, html);
  // The report stage as the command runs it (Parquet read, assembly, page), alone in a child process.
  const folder = join(dir, 'folder');
  await writeReportFolder(folder, tables);
  const child = buildReportInChild(folder);
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
  try {
    const url = pathToFileURL(file).href;
    const times: number[] = [];
    for (let k = 0; k <= loads; k++) {
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      const start = process.hrtime.bigint();
      await page.goto(url, { waitUntil: 'load', timeout: 600_000 });
      const s = seconds(start);
      await page.close();
      if (k > 0) times.push(s); // the first page warms the browser and the file cache
    }
    return {
      runs: tables.runs.length,
      receivers: new Set(tables.fields.map((f) => f.range_m)).size,
      bytes: Buffer.byteLength(html),
      assembleS,
      buildHtmlS,
      loadS: median(times),
      loads: times,
      folderBuildS: child.buildS,
      folderPeakRssBytes: child.peakRssBytes,
    };
  } finally {
    await browser.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const r = await measureReportSize();
  if (process.argv.includes('--json')) {
    process.stdout.write(`${JSON.stringify(r)}\n`);
    return;
  }
  const mb = r.bytes / (1024 * 1024);
  const mark = (ok: boolean) => (ok ? 'within target' : 'OVER TARGET');
  process.stdout.write(
    [
      `report of ${r.runs} runs × ${r.receivers} receivers (made-up numbers)`,
      `size:        ${mb.toFixed(2)} MiB (target ≤ ${REPORT_TARGETS.maxBytes / 1024 / 1024} MiB: ${mark(r.bytes <= REPORT_TARGETS.maxBytes)})`,
      `build:       ${(r.assembleS + r.buildHtmlS).toFixed(2)} s (assembly ${r.assembleS.toFixed(2)} s, HTML and plots ${r.buildHtmlS.toFixed(2)} s)`,
      `from folder: ${r.folderBuildS.toFixed(2)} s to read the Parquet files and write report.html (child process)`,
      `peak RSS:    ${(r.folderPeakRssBytes / 1024 / 1024).toFixed(0)} MiB of that child (process.resourceUsage().maxRSS)`,
      `load:        ${r.loadS.toFixed(2)} s median of ${r.loads.length} (${r.loads.map((s) => s.toFixed(2)).join(', ')}; target ≤ ${REPORT_TARGETS.maxLoadS} s: ${mark(r.loadS <= REPORT_TARGETS.maxLoadS)})`,
    ].join('\n') + '\n',
  );
}

// Run only as a script (the test imports nothing from here, but keep it importable).
if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main().catch((e) => {
    process.stderr.write(`error: bench:report: ${(e as Error).message}\n`);
    process.exitCode = 70;
  });
}
