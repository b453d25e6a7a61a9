#!/usr/bin/env node
// Entry point: the compiled command line (npm ci runs `prepare`, which compiles TypeScript to dist/).
import('../dist/coordinator/cli.js').then((m) => m.main(process.argv)).catch((err) => {
  if (err && err.code === 'ERR_MODULE_NOT_FOUND') {
    process.stderr.write('error: loamwave is not built; run `npm ci` (or `npm run build`) in the project folder\n');
  } else {
    process.stderr.write(`error: ${err && err.stack ? err.stack : err}\n`);
  }
  process.exit(70);
});
