// The dependency rule of DEVELOPERS.md ("Layout"), checked in the test run (test/layout.dependencies.test.ts):
// schemas <- solver <- worker <- coordinator; inside the coordinator,
// commands -> {dispatch, queue, outputs, report} -> {sweep, ledger, analysis, sampling}; nothing imports commands/.
const lower = '^coordinator/(sweep|ledger|analysis|sampling)/';
const middle = '^coordinator/(dispatch|queue|outputs|report)/';

module.exports = {
  forbidden: [
    { name: 'schemas-import-nothing-of-ours', severity: 'error', from: { path: '^schemas/' }, to: { path: '^(solver|worker|coordinator|bench|test)/' } },
    { name: 'solver-above-schemas-only', severity: 'error', from: { path: '^solver/' }, to: { path: '^(worker|coordinator|bench|test)/' } },
    {
      name: 'solver-does-no-io',
      comment: 'The solver is pure numerics: no files, network, processes, threads or clocks.',
      severity: 'error',
      from: { path: '^solver/' },
      to: { path: '^(node:)?(fs|fs/promises|net|http|https|child_process|worker_threads|dgram|perf_hooks)$', dependencyTypes: ['core'] },
    },
    { name: 'worker-below-coordinator', severity: 'error', from: { path: '^worker/' }, to: { path: '^(coordinator|bench|test)/' } },
    { name: 'nothing-imports-commands', severity: 'error', from: { path: '^coordinator/', pathNot: '^coordinator/(commands/|cli\\.ts$)' }, to: { path: '^coordinator/commands/' } },
    { name: 'lower-tier-imports-no-upper', severity: 'error', from: { path: lower }, to: { path: middle } },
    { name: 'outputs-never-writes-the-report', severity: 'error', from: { path: '^coordinator/outputs/' }, to: { path: '^coordinator/report/' } },
    { name: 'no-cycles', severity: 'error', from: {}, to: { circular: true } },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: '^(dist|node_modules)/' },
    tsConfig: { fileName: 'tsconfig.json' },
    tsPreCompilationDeps: true,
  },
};
