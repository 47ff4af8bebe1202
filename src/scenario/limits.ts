/**
 * Hard limits of the engine, checked on the resolved scenario: sizes beyond which a run cannot
 * work at all (typed arrays, 8-bit state codes, 32-bit shot numbers, floating-point range), as
 * opposed to sizes that merely need more memory or time than the machine has (the resource
 * guard's business, io/resource-guard.ts). Each limit is an InputError at the key that sets it.
 */
import type { Scenario } from './types.ts';
import type { ResolveContext } from './context.ts';
import type { KeyPath } from './issues.ts';
import { valueAt } from './issues.ts';
import { makeGrid } from '../signal/grid.ts';
import { classifierOf } from '../classify/registry.ts';

/** Most samples in one record (one Float64Array of them is 1 GiB). */
export const MAX_RECORD_SAMPLES = 2 ** 27;
/** Most shots (scored or calibration) per point: shot numbers are 32-bit in shots.arrow. */
export const MAX_SHOTS = 2 ** 32;
/** Most hidden states and pipelines (they are 8-bit codes in the tables). */
export const MAX_STATES = 64;
export const MAX_PIPELINES = 64;
/** Most expected jumps of the hidden state in one record (the path is kept per shot). */
export const MAX_JUMPS_PER_RECORD = 1e6;
/**
 * Range of signal magnitudes (SI, after the gain) the arithmetic handles: squares and sums of
 * squares over a record stay far from overflow (1e308) and underflow (1e-308).
 */
export const MAX_SIGNAL = 1e100;
export const MIN_SIGNAL = 1e-100;
/**
 * Smallest white noise per sample, relative to the largest level, that a pipeline dividing by the
 * noise (optimal weights, the likelihood classifier) can estimate: a noise a billion times below
 * the levels still stands well above their rounding (1e-16 of them).
 */
export const MIN_NOISE_TO_LEVEL = 1e-9;

function signalInRange(x: number): boolean {
  const a = Math.abs(x);
  return a === 0 || (a >= MIN_SIGNAL && a <= MAX_SIGNAL);
}

/** The first key among `keys` that the raw document has under `at` (else the first). */
function writtenKey(ctx: ResolveContext, at: KeyPath, keys: string[]): KeyPath {
  const node = valueAt(ctx.raw, at);
  const key = keys.find((k) => node !== null && typeof node === 'object' && k in node) ?? keys[0]!;
  return [...at, key];
}

/** Throws an InputError for the first hard limit the scenario breaks. */
export function checkLimits(s: Scenario, ctx: ResolveContext): void {
  const samples = makeGrid(s.timing).samples;
  if (samples > MAX_RECORD_SAMPLES) {
    ctx.fail(['timing', 'recordLength'], `a record of at most ${MAX_RECORD_SAMPLES} samples at this sample rate`,
      `${ctx.found(['timing', 'recordLength'])} (${samples.toPrecision(3)} samples)`);
  }
  if (s.shots > MAX_SHOTS) ctx.fail(['shots'], `at most ${MAX_SHOTS} shots per point`);
  if (s.calibrationShots > MAX_SHOTS) ctx.fail(['calibrationShots'], `at most ${MAX_SHOTS} calibration shots per point`);
  if (s.states.length > MAX_STATES) ctx.fail(['states'], `a list of at most ${MAX_STATES} states`);
  if (s.pipelines.length > MAX_PIPELINES) ctx.fail(['pipelines'], `a list of at most ${MAX_PIPELINES} pipelines`);

  for (let o = 0; o < s.outcomes.length; o++) {
    if (!s.states.some((st, i) => st.outcome === o && s.prepare[i]! > 0)) {
      ctx.fail(['prepare'], `weights that prepare some shots with outcome ${JSON.stringify(s.outcomes[o])} (the calibration needs shots of both outcomes)`,
        ctx.found(['prepare']));
    }
  }

  const exit = new Float64Array(s.states.length);
  for (const t of s.transitions) exit[t.from]! += t.rate;
  s.transitions.forEach((t, i) => {
    if (exit[t.from]! * s.timing.recordLength > MAX_JUMPS_PER_RECORD) {
      const at = writtenKey(ctx, ['transitions', i], ['lifetime', 'rate']);
      ctx.fail(at, `rates out of "${s.states[t.from]!.name}" giving at most ${MAX_JUMPS_PER_RECORD} expected jumps per record`);
    }
  });

  const gain = s.signal.gain;
  const range = `between ${MIN_SIGNAL} and ${MAX_SIGNAL} in SI units after the gain (or 0)`;
  s.states.forEach((st, i) => {
    if (!signalInRange(st.level.re * gain) || !signalInRange(st.level.im * gain) || !signalInRange(Math.hypot(st.level.re, st.level.im) * gain)) {
      ctx.fail(['states', i, 'level'], `a level ${range}`);
    }
  });
  if (s.signal.white && !signalInRange(s.signal.white.density * gain * Math.sqrt(s.timing.sampleRate / 2))) {
    ctx.fail(writtenKey(ctx, ['signal', 'noise', 'white'], ['density', 'perSample']), `white noise whose σ per sample is ${range}`);
  }
  // optimal weights and the likelihood classifier divide by the noise: a record without any cannot be calibrated
  const largest = Math.max(...s.states.map((st) => Math.hypot(st.level.re, st.level.im)));
  const noisy = (s.signal.white !== null && s.signal.white.density > 0) || s.signal.components || (s.signal.sources?.length ?? 0) > 0 || s.sensor !== undefined;
  s.pipelines.forEach((p, i) => {
    const classifier = classifierOf(p).needsNoise;
    const divides = p.weights === 'optimal' ? 'optimal weights divide by the noise covariance' : classifier;
    if (!divides) return;
    const at: KeyPath = [...(valueAt(ctx.raw, ['pipelines']) === undefined ? ['processing'] : ['pipelines', i]), p.weights === 'optimal' ? 'weights' : 'classifier'];
    if (!noisy) ctx.fail(at, `a record with noise (${divides}; set signal.noise)`, 'a scenario without noise');
    // white noise alone, far below the levels, is lost in their rounding: the estimate is singular
    const sigma = (s.signal.white?.density ?? 0) * Math.sqrt(s.timing.sampleRate / 2);
    if (sigma < MIN_NOISE_TO_LEVEL * largest && !s.signal.components && (s.signal.sources?.length ?? 0) === 0 && s.sensor === undefined) {
      ctx.fail(at, `white noise of at least ${MIN_NOISE_TO_LEVEL} of the largest level per sample (${divides}, which a noise lost in the levels' rounding makes singular)`, `σ = ${sigma.toPrecision(3)} per sample for levels up to ${largest.toPrecision(3)}`);
    }
  });
  s.pipelines.forEach((p, i) => {
    if (p.threshold.method === 'fixed' && !signalInRange(p.threshold.value)) {
      const at: KeyPath = valueAt(ctx.raw, ['pipelines']) === undefined ? ['processing', 'threshold', 'fixed'] : ['pipelines', i, 'threshold', 'fixed'];
      ctx.fail(at, `a threshold between ${MIN_SIGNAL} and ${MAX_SIGNAL} in SI units (or 0)`);
    }
  });
}
