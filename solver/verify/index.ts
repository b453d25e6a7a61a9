// The published-reference checks of the solver, as data: `loamwave verify` prints them and the tests assert them.
// Each family module runs small cases (seconds) and compares with an analytic reference named beside it; every
// outcome carries its tolerance and the reason for it. To add a family: import it and list it in FAMILIES.
import { dispersionFamily } from './dispersion.js';
import { groundWaveFamily } from './ground-wave.js';
import { mixedPathFamily } from './mixed-path.js';
import { mixedPathSphereFamily } from './mixed-path-sphere.js';
import type { CheckFamily, ReferenceCheck } from './outcome.js';
import { perfectGroundFamily } from './perfect-ground.js';
import { planarGuideFamily } from './planar-guide.js';
import { reflectionFamily } from './reflection.js';
import { sphericalFamily } from './spherical.js';

export type { Bound, CheckFamily, CheckOutcome, ReferenceCheck, Tolerance } from './outcome.js';
export { pecDipoleFieldVPerM } from './perfect-ground.js';

/** The families `loamwave verify` runs, in this order (one entry each). */
export const FAMILIES: readonly CheckFamily[] = [
  dispersionFamily,
  reflectionFamily,
  perfectGroundFamily,
  groundWaveFamily,
  planarGuideFamily,
  mixedPathFamily,
  mixedPathSphereFamily,
  sphericalFamily,
];

/** Every check `loamwave verify` runs, in order. */
export function referenceChecks(): ReferenceCheck[] {
  return FAMILIES.flatMap((family) => family.checks());
}
