/**
 * Small dense linear algebra for 3x3 matrices stored row-major in flat arrays (internal helpers).
 * Method: cyclic Jacobi rotations for symmetric eigenproblems (Golub & Van Loan, Matrix
 * Computations, 4th ed., section 8.5); Rodrigues' formula for rotation matrices.
 * Cost: O(1) each; no allocation unless an output is created.
 */

/** A 3x3 matrix, row-major: m[3 * row + col]. */
export type Mat3 = Float64Array;

/** Identity matrix (new). */
export function identity3(): Mat3 {
  return Float64Array.of(1, 0, 0, 0, 1, 0, 0, 0, 1);
}

/**
 * Rotation exp(angle [a]x) about the unit vector a (Rodrigues' formula), written into out.
 * @example rotation3(new Float64Array(9), 0, 0, 1, Math.PI / 2) // maps x to y
 */
export function rotation3(out: Mat3, ax: number, ay: number, az: number, angle: number): Mat3 {
  const s = Math.sin(angle);
  const c1 = 1 - Math.cos(angle);
  out[0] = 1 - c1 * (ay * ay + az * az);
  out[1] = -s * az + c1 * ax * ay;
  out[2] = s * ay + c1 * ax * az;
  out[3] = s * az + c1 * ax * ay;
  out[4] = 1 - c1 * (ax * ax + az * az);
  out[5] = -s * ax + c1 * ay * az;
  out[6] = -s * ay + c1 * ax * az;
  out[7] = s * ax + c1 * ay * az;
  out[8] = 1 - c1 * (ax * ax + ay * ay);
  return out;
}

/**
 * Bond rotation of the local frame over a step h at constant Darboux vector D = (tau, 0, kappa)
 * in (T, N, B) components: R = exp(-h [D]x), so that local components c transported by the lab
 * frame map as c_(i+1) = R c_i. Written into out (row-major).
 */
export function bondRotation(out: Mat3, kappa: number, tau: number, h: number): Mat3 {
  const d = Math.hypot(kappa, tau);
  if (d === 0) {
    out.fill(0);
    out[0] = out[4] = out[8] = 1;
    return out;
  }
  return rotation3(out, tau / d, 0, kappa / d, -h * d);
}

export { symEigen3 } from "../frame/symEigen3.js";
