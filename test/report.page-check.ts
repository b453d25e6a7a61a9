// Opens a report page in headless Chromium (Debian's /usr/bin/chromium through playwright-core) and reports what
// rendered: the plots with drawn marks, console errors and any network request. Shared by the report tests.
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';

export type Browser = Awaited<ReturnType<typeof chromium.launch>>;

export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
  });
}

export interface PageCheck {
  /** data-plot ids of every figure on the page, in page order. */
  plots: string[];
  /** Per plot: number of data-mark paths with a non-empty outline, and the drawn width in px. */
  marks: Record<string, { paths: number; widthPx: number }>;
  errors: string[];
  /** Every request other than the page itself. */
  requests: string[];
  /** Text of the page's table rows in #runs. */
  runRows: number;
  /** Right edge of the grid-convergence verdict table's last column, px (null without one), in a 1280 px window. */
  convergenceRightPx: number | null;
  /** Whether the verdict table's box needs a horizontal scroll bar to show all its columns. */
  convergenceScrolls: boolean;
}

/** Width of the window the report must fit (a common laptop screen; common practice for report layouts). */
export const WINDOW_WIDTH_PX = 1280;

/** Load `file` and collect what rendered; optionally save a full-page screenshot. */
export async function checkReportPage(browser: Browser, file: string, screenshot?: string): Promise<PageCheck> {
  const page = await browser.newPage({ viewport: { width: WINDOW_WIDTH_PX, height: 900 } });
  const errors: string[] = [];
  const requests: string[] = [];
  const url = pathToFileURL(file).href;
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on('request', (r) => {
    if (r.url() !== url) requests.push(r.url());
  });
  try {
    await page.goto(url, { waitUntil: 'load' });
    const plots = await page.$$eval('figure.plot', (figs) => figs.map((f) => f.getAttribute('data-plot') ?? ''));
    const marks: PageCheck['marks'] = {};
    for (const id of plots) {
      // Data marks are the role-mark groups vega writes; count their paths that outline something.
      const paths = await page.$$eval(`figure[data-plot="${id}"] svg g.role-mark path`, (ps) =>
        ps.filter((p) => (p.getAttribute('d') ?? '').length > 2).length,
      );
      const widthPx = await page.$eval(`figure[data-plot="${id}"] svg`, (s) => s.getBoundingClientRect().width);
      marks[id] = { paths, widthPx };
    }
    const runRows = await page.$$eval('#runs tbody tr', (rows) => rows.length);
    const fit = await page.evaluate(() => {
      const table = document.querySelector('table.convergence');
      if (!table) return { right: null, scrolls: false };
      const last = table.querySelector('thead th:last-child');
      const box = table.parentElement!;
      return { right: last ? last.getBoundingClientRect().right : null, scrolls: box.scrollWidth > box.clientWidth + 1 };
    });
    if (screenshot) await page.screenshot({ path: screenshot, fullPage: true });
    return { plots, marks, errors, requests, runRows, convergenceRightPx: fit.right, convergenceScrolls: fit.scrolls };
  } finally {
    await page.close();
  }
}
