// Screenshot of a sweep's report.html in headless Chromium (Debian's /usr/bin/chromium), for the README.
// Usage: node scripts/screenshot-report.mjs OUT_DIR PNG [WIDTH] [HEIGHT]
import { chromium } from 'playwright-core';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';

const [dir, png, width = '1280', height = '2400'] = process.argv.slice(2);
const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
});
const page = await browser.newPage({ viewport: { width: Number(width), height: Number(height) } });
await page.goto(pathToFileURL(resolve(dir, 'report.html')).href);
await page.screenshot({ path: png, fullPage: false });
await browser.close();
