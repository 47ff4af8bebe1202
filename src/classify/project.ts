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

/**
 * Projects `count` records of `bins` bins stored row after row: out[r·bins + b] =
 * I·cos α + Q·sin α (Q = 0 when null). Returns out.
 */
export function projectRecords(
  inPhase: Float64Array, quadrature: Float64Array | null, axis: Axis, out: Float64Array = new Float64Array(inPhase.length),
): Float64Array {
  if (quadrature === null || axis.sin === 0) {
    for (let k = 0; k < inPhase.length; k++) out[k] = inPhase[k]! * axis.cos;
    return out;
  }
  for (let k = 0; k < inPhase.length; k++) out[k] = inPhase[k]! * axis.cos + quadrature[k]! * axis.sin;
  return out;
}

/**
 * A pipeline's kernels projected onto the axis, cos·K_I + sin·K_Q, on their support [lo, hi) of
 * each of the record's `channels` channels (channel-major; zero elsewhere).
 */
export function projectKernel(
  k: { inPhase: Float64Array; quadrature: Float64Array | null; lo: number; hi: number }, axis: Axis, channels = 1,
): Float64Array {
  const kernel = new Float64Array(k.inPhase.length);
  const samples = k.inPhase.length / channels;
  for (let at = 0; at < k.inPhase.length; at += samples) {
    for (let j = at + k.lo; j < at + k.hi; j++) kernel[j] = k.inPhase[j]! * axis.cos + (k.quadrature ? k.quadrature[j]! * axis.sin : 0);
  }
  return kernel;
}
