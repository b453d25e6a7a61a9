// Exact fields and radiated power of the two sources of Loamwave over a perfectly conducting ground: the short
// vertical electric dipole (axisymmetric geometry) and the line of vertical current elements (planar geometry).
// They fix the absolute scale of the solver's sources (power_w) and are the `pec` ground checks. e^{jωt}; no I/O.
import { C0, ETA0 } from '../constants.js';
import { type C, add, c, exp, mul, mulJ, scale, sub } from './complex.js';
import { besselOrders01 } from './bessel.js';

/** Fields at one point, peak phasors (SI, e^{jωt}); multiply by 1/√2 for rms. */
export interface PointField {
  /** Horizontal electric field, along +r (3-D) or +x (2-D) (V/m). */
  readonly eHorizontal: C;
  /** Vertical electric field (V/m). */
  readonly ez: C;
  /** Magnetic field, along φ̂ (3-D) or ŷ (2-D) (A/m). */
  readonly h: C;
}

/**
 * Fields of a Hertzian vertical electric dipole of moment I·l (peak A·m) standing on a perfectly conducting plane
 * at the origin, at the point (horizontal distance ρ, height z ≥ 0). With its image the source is a free-space
 * dipole of moment 2·I·l, whose exact fields at distance r, polar angle θ are (C. A. Balanis, Antenna Theory,
 * 3rd ed., 2005, §4.2, from memory; doubled for the image):
 *   E_r = 2·ηIl·cos θ/(2πr²)·(1 + 1/(jkr))·e^{−jkr}
 *   E_θ = 2·jηkIl·sin θ/(4πr)·(1 + 1/(jkr) − 1/(kr)²)·e^{−jkr}
 *   H_φ = 2·jkIl·sin θ/(4πr)·(1 + 1/(jkr))·e^{−jkr}
 * returned in cylindrical components: E_ρ = E_r sin θ + E_θ cos θ, E_z = E_r cos θ − E_θ sin θ. On the plane
 * (θ = 90°) E_z = −E_θ: E_z = −jηkIl/(2πρ)·(1 + 1/(jkρ) − 1/(kρ)²)·e^{−jkρ}, opposite to the current in the
 * far zone, and E_ρ = 0. Valid for r > 0 and a dipole short against λ; η = η0 (free space above the plane).
 */
export function pecDipoleField(frequencyHz: number, momentAM: number, rhoM: number, zM = 0): PointField {
  const k = (2 * Math.PI * frequencyHz) / C0;
  const r = Math.hypot(rhoM, zM);
  const sinT = rhoM / r;
  const cosT = zM / r;
  const kr = k * r;
  const phase = exp(c(0, -kr)); // e^{−jkr}
  const invJkr = c(0, -1 / kr); // 1/(jkr)
  const radial = add(c(1), invJkr); // 1 + 1/(jkr)
  const transverse = add(c(1 - 1 / (kr * kr)), invJkr); // 1 + 1/(jkr) − 1/(kr)²
  const momentImage = 2 * momentAM;
  const eR = scale(mul(radial, phase), (ETA0 * momentImage * cosT) / (2 * Math.PI * r * r)); // E_r (Balanis §4.2)
  const eTheta = mulJ(scale(mul(transverse, phase), (ETA0 * k * momentImage * sinT) / (4 * Math.PI * r))); // E_θ
  const hPhi = mulJ(scale(mul(radial, phase), (k * momentImage * sinT) / (4 * Math.PI * r))); // H_φ
  return fromSphericalComponents(eR, eTheta, hPhi, sinT, cosT);
}

/**
 * Horizontal and vertical components from radial and angular ones, the angle measured from the vertical:
 * r̂ = (sin θ, cos θ) and θ̂ = (cos θ, −sin θ) in (horizontal, z).
 */
function fromSphericalComponents(eRadial: C, eAngular: C, h: C, sinAngle: number, cosAngle: number): PointField {
  return {
    eHorizontal: add(scale(eRadial, sinAngle), scale(eAngular, cosAngle)),
    ez: sub(scale(eRadial, cosAngle), scale(eAngular, sinAngle)),
    h,
  };
}

/**
 * Power radiated into the half-space above the perfect plane by the dipole of moment I·l (peak):
 * P = η0·k²·(I·l)²/(6π) (W) — half the power of the free-space dipole 2·I·l, whose radiated power is
 * η(k·2Il)²/(12π) (Balanis 2005, §4.2, from memory). With η ≈ 120π this is the familiar P = 80π²(I·l/λ)²
 * (docs/references.md); with the exact η0 it is 0.07 % lower.
 */
export function pecDipoleRadiatedPowerW(frequencyHz: number, momentAM: number): number {
  const k = (2 * Math.PI * frequencyHz) / C0;
  return (ETA0 * k * k * momentAM * momentAM) / (6 * Math.PI); // P = η0 k² (Il)²/(6π)
}

/** Peak moment I·l (A·m) that radiates `powerW` over the perfect plane: the inverse of pecDipoleRadiatedPowerW. */
export function pecDipoleMomentForPowerAM(frequencyHz: number, powerW: number): number {
  const k = (2 * Math.PI * frequencyHz) / C0;
  return Math.sqrt((6 * Math.PI * powerW) / ETA0) / k; // I·l = √(6πP/η0)/k
}

/**
 * Far-field rms E at the ground, distance d, for a dipole radiating P over a perfect plane:
 * E_rms = √(3η0P/(4π))/d (V/m), from |E_z|peak = η0·k·Il/(2πd) and P above (derived). With η0 ≈ 120π this is
 * √(90P)/d, i.e. 300·√(P/1 kW)/d_km mV/m (the reference of ITU-R P.368's ground-wave curves; docs/references.md),
 * of which the exact η0 gives 299.90 mV/m.
 */
export function pecDipoleFarFieldRmsVPerM(powerW: number, rangeM: number): number {
  return Math.sqrt((3 * ETA0 * powerW) / (4 * Math.PI)) / rangeM; // E_rms = √(3η0P/(4π))/d
}

/**
 * Fields of a line of vertical current elements along y, moment p per unit length (peak A·m/m), standing on a
 * perfectly conducting plane z = 0 at x = 0, at the point (x, z), z ≥ 0 (the planar geometry's source).
 *
 * Derivation: with the image the source is J = ẑ·2p·δ(x)δ(z) in free space; its vector potential is
 * A_z = μ0·2p·G, G = (1/(4j))·H0^(2)(kρ) the 2-D Green's function of (∇² + k²)G = −δ for e^{jωt}
 * (R. F. Harrington, Time-Harmonic Electromagnetic Fields, 1961, the electric line source, from memory). Then
 * H = ∇×A/μ0 and E = ∇×H/(jωε0) give, with ψ the angle from the vertical (x = ρ sin ψ, z = ρ cos ψ):
 *   H_y = −(jkp/2)·H1^(2)(kρ)·sin ψ
 *   E_ρ = −(η0p/(2ρ))·H1^(2)(kρ)·cos ψ,   E_ψ = (kη0p/2)·H1^(2)'(kρ)·sin ψ,   H1' (u) = H0(u) − H1(u)/u
 * and on the plane (ψ = 90°, x > 0): E_z = −E_ψ = −(kη0p/2)·H1^(2)'(kx), H_y = −(jkp/2)·H1^(2)(kx).
 * Far field: E_z → −η0·H_y, the wave travelling outwards. Valid for ρ > 0.
 */
export function pecLineSourceField(frequencyHz: number, momentPerLengthAM: number, xM: number, zM = 0): PointField {
  const k = (2 * Math.PI * frequencyHz) / C0;
  const rho = Math.hypot(xM, zM);
  const sinP = xM / rho;
  const cosP = zM / rho;
  const u = k * rho;
  const b = besselOrders01(u);
  const h1 = c(b.j1, -b.y1); // H1^(2)(u) = J1 − jY1
  const h1Prime = c(b.j0 - b.j1 / u, -(b.y0 - b.y1 / u)); // H1^(2)'(u) = H0^(2)(u) − H1^(2)(u)/u (A&S 9.1.27)
  const p = momentPerLengthAM;
  const hy = mulJ(scale(h1, (-k * p * sinP) / 2)); // H_y = −(jkp/2)·H1(kρ)·sin ψ
  const eRho = scale(h1, (-ETA0 * p * cosP) / (2 * rho)); // E_ρ = −(η0p/(2ρ))·H1(kρ)·cos ψ
  const ePsi = scale(h1Prime, (k * ETA0 * p * sinP) / 2); // E_ψ = (kη0p/2)·H1'(kρ)·sin ψ
  return fromSphericalComponents(eRho, ePsi, hy, sinP, cosP);
}

/**
 * Power per unit length (W/m) radiated over the perfect plane by the line source of moment p (peak A·m/m):
 * P' = η0·p²·k/8.
 *
 * Derivation: the outward flux through a half circle of radius ρ is S_ρ = ½Re(E_ψ·H_y*) (with (ρ̂, ψ̂, ŷ)
 * right-handed) = (k²η0p²/8)·sin²ψ·(−Im(H1'·conj H1)). With H1 = J1 − jY1, −Im(H1'·conj H1) = J1Y1' − J1'Y1
 * = 2/(πkρ) (the Wronskian, A&S 9.1.16), so S_ρ = (kη0p²/(4πρ))·sin²ψ, and ∫_{−π/2}^{π/2} S_ρ·ρ dψ =
 * (kη0p²/(4π))·(π/2) = η0p²k/8, the same on every radius, as it must be in a lossless medium.
 */
export function pecLineSourceRadiatedPowerWPerM(frequencyHz: number, momentPerLengthAM: number): number {
  const k = (2 * Math.PI * frequencyHz) / C0;
  return (ETA0 * momentPerLengthAM * momentPerLengthAM * k) / 8; // P' = η0 p² k/8
}

/** Peak moment per unit length p (A·m/m) radiating `powerWPerM` over the perfect plane: p = √(8P'/(η0k)). */
export function pecLineSourceMomentForPowerAM(frequencyHz: number, powerWPerM: number): number {
  const k = (2 * Math.PI * frequencyHz) / C0;
  return Math.sqrt((8 * powerWPerM) / (ETA0 * k)); // p = √(8P'/(η0 k))
}
