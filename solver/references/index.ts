// The analytic references in one import, for `loamwave verify` and the physics tests: closed forms and
// published special functions only, no I/O. Complex arithmetic is re-exported as a namespace to keep names apart.
export * as complex from './complex.js';
export type { C } from './complex.js';
export { dawson, erfc, faddeeva } from './faddeeva.js';
export {
  complexPermittivity,
  goodConductorSurfaceImpedance,
  normalIncidenceReflection,
  normalisedSurfaceImpedance,
  skinDepthM,
  surfaceImpedance,
  surfaceInductanceH,
  surfaceResistanceOhm,
} from './fresnel.js';
export { type NortonDeltaForm, type NortonOptions, nortonAttenuation, nortonDelta, nortonFieldRatio, numericalDistance } from './norton.js';
export { type YeeGrid, type YeeNormalisedGrid, yeeMaxTimeStepS, yeePhaseVelocityRatio, yeePhaseVelocityRatioNormalised } from './yee-dispersion.js';
export {
  type GuideMode,
  oneLossyWallAttenuationNpPerM,
  parallelPlateGuideMode,
  parallelPlateGuideModeOverGround,
} from './parallel-plate-guide.js';
export { type BesselOrders01, besselOrders01, hankel2Order0, hankel2Order1 } from './bessel.js';
export {
  type PointField,
  pecDipoleFarFieldRmsVPerM,
  pecDipoleField,
  pecDipoleMomentForPowerAM,
  pecDipoleRadiatedPowerW,
  pecLineSourceField,
  pecLineSourceMomentForPowerAM,
  pecLineSourceRadiatedPowerWPerM,
} from './dipole.js';
export { type AiryAi, type AiryValues, type FockW, airy, airyAi, airyAiZero, airyAipZero, fockW } from './airy.js';
export {
  type Attenuation,
  type AttenuationOptions,
  type SphericalEarthField,
  type SphericalEarthOptions,
  type SphericalEarthParameters,
  EARTH_MEAN_RADIUS_M,
  residueRoot,
  residueRoots,
  sphericalEarthAttenuation,
  sphericalEarthField,
  sphericalEarthFieldRatio,
  sphericalEarthParameters,
} from './spherical-earth.js';
export {
  type HomogeneousCurve,
  type HomogeneousFieldCurve,
  type MillingtonField,
  type PathSection,
  millington,
  millingtonField,
  millingtonForward,
  millingtonReverse,
  pathToRange,
} from './millington.js';
