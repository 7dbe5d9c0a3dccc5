/**
 * Scalp geometry for the generator: positions on the unit sphere of shared/montage (+x right ear,
 * +y nasion, +z vertex) and smooth scalp patterns.
 *
 * Forward model (ours, deliberately simple, not a volume-conductor model): a cortical source at
 * unit-sphere point s projects to an electrode at e with gain exp(-d^2 / (2 sigma^2)), where d is
 * the great-circle angle between s and e in degrees and sigma the source's spread. The gain is 1
 * at the source's scalp centre, so a source amplitude in µV is "µV at the nearest scalp point".
 * Broad, smooth and positive, like the radial projection of a tangentially spread cortical
 * patch; it has no second (opposite-sign) lobe, which a dipole in a spherical head would show.
 */
import { positionOf } from '../shared/montage';

/** A point on the unit sphere; thetaDeg from +z, phiDeg from +x towards +y. */
export interface SpherePoint { x: number; y: number; z: number; thetaDeg: number; phiDeg: number }

const RAD = Math.PI / 180;

/** Unit-sphere point from polar angle and azimuth in degrees. */
export function fromAngles(thetaDeg: number, phiDeg: number): SpherePoint {
  const t = thetaDeg * RAD;
  const p = phiDeg * RAD;
  return { x: Math.sin(t) * Math.cos(p), y: Math.sin(t) * Math.sin(p), z: Math.cos(t), thetaDeg, phiDeg };
}

/** Position of a 10-10 electrode (any spelling shared/montage accepts). */
export function electrodePoint(name: string): SpherePoint {
  const p = positionOf(name);
  if (!p) throw new Error(`unknown 10-10 position '${name}'`);
  return { x: p.x, y: p.y, z: p.z, thetaDeg: p.thetaDeg, phiDeg: p.phiDeg };
}

/** Great-circle angle between two unit-sphere points, degrees. */
export function greatCircleDeg(a: SpherePoint, b: SpherePoint): number {
  const dot = Math.max(-1, Math.min(1, a.x * b.x + a.y * b.y + a.z * b.z));
  return Math.acos(dot) / RAD;
}

/** Gaussian scalp pattern of a source at `source` over `electrodes` (see the module comment). */
export function gaussianPattern(source: SpherePoint, electrodes: SpherePoint[], spreadDeg: number): Float64Array {
  const out = new Float64Array(electrodes.length);
  const k = 1 / (2 * spreadDeg * spreadDeg);
  electrodes.forEach((e, i) => {
    const d = greatCircleDeg(source, e);
    out[i] = Math.exp(-d * d * k);
  });
  return out;
}

/**
 * `n` points spread evenly over the cap theta <= maxThetaDeg (Fibonacci / golden-angle lattice on
 * the sphere, e.g. Gonzalez 2010, Math Geosci 42:49-64), used to place background sources.
 */
export function fibonacciCap(n: number, maxThetaDeg: number): SpherePoint[] {
  const zMin = Math.cos(maxThetaDeg * RAD);
  const golden = Math.PI * (3 - Math.sqrt(5));
  const out: SpherePoint[] = [];
  for (let i = 0; i < n; i++) {
    const z = 1 - (1 - zMin) * (i + 0.5) / n;
    const theta = Math.acos(z) / RAD;
    const phi = (((i * golden) / RAD) % 360 + 360) % 360;
    out.push(fromAngles(theta, phi));
  }
  return out;
}

/**
 * Spread of the vertical-EOG (blink) pattern: a Gaussian centred at the nasion point (Nz,
 * theta 112.5°, the stand-in for the vertical-EOG site) whose gain at Cz (112.5° away) is
 * 9.3 % of the gain at the EOG site: blink artifact at Cz = 9.3 % of vertical EOG
 * (Corby & Kopell 1972, Psychophysiology 9(6):640-644, abstract).
 * sigma = 112.5 / sqrt(2 ln(1/0.093)) ≈ 51.6°.
 */
export const BLINK_CZ_FRACTION = 0.093;
export const BLINK_SPREAD_DEG = 112.5 / Math.sqrt(2 * Math.log(1 / BLINK_CZ_FRACTION));

/** Eye sites for horizontal EOG: below and lateral to F7/F8 (near the outer canthi). */
export const LEFT_CANTHUS = fromAngles(105, 144);
export const RIGHT_CANTHUS = fromAngles(105, 36);
export const SACCADE_SPREAD_DEG = 35;

/** Temporal muscle sites (temporalis) for muscle bursts: at T7 and T8, slightly below. */
export const LEFT_TEMPORALIS = fromAngles(100, 180);
export const RIGHT_TEMPORALIS = fromAngles(100, 0);
export const MUSCLE_SPREAD_DEG = 20;
