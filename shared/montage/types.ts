/**
 * One electrode of the 10-10 system on the unit sphere.
 * Axes: +x towards the right ear, +y towards the nasion, +z towards the vertex (Cz).
 * `thetaDeg` is the polar angle from Cz, `phiDeg` the azimuth from +x towards +y, in degrees
 * (0 <= phi < 360; 0 for Cz). `u`, `v` are the 2-D azimuthal-equidistant projection with radius
 * theta / 90°, so the Fpz-T7-Oz-T8 circumference lies on the unit circle (+u right, +v nose).
 */
export interface ElectrodePosition {
  readonly name: string;
  readonly x: number;
  readonly y: number;
  readonly z: number;
  readonly u: number;
  readonly v: number;
  readonly thetaDeg: number;
  readonly phiDeg: number;
}
