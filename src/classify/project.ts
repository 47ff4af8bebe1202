/**
 * Projection of integrated I/Q onto the separation axis: value = I·cos α + Q·sin α, with α the
 * angle of the separation between the two outcome groups. It keeps the signal's units.
 */

/** A projection axis: the unit vector (cos α, sin α). */
export interface Axis {
  cos: number;
  sin: number;
}

/** The axis along (I1 − I0, Q1 − Q0); the I axis when the separation is exactly zero. */
export function separationAxis(i0: number, q0: number, i1: number, q1: number): Axis {
  const di = i1 - i0, dq = q1 - q0;
  const r = Math.hypot(di, dq);
  return r > 0 ? { cos: di / r, sin: dq / r } : { cos: 1, sin: 0 };
}

/** out[i] = inPhase[i]·cos α + quadrature[i]·sin α; returns out. */
export function project(inPhase: Float64Array, quadrature: Float64Array, axis: Axis, out: Float64Array): Float64Array {
  for (let i = 0; i < out.length; i++) out[i] = inPhase[i]! * axis.cos + quadrature[i]! * axis.sin;
  return out;
}
