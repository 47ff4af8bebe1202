/**
 * Plausibility warnings on a resolved scenario: things that are legal but probably not what the
 * user meant. Warnings never stop a run; `run` and `check` print each on stderr as one line
 * "warning: FILE: key.path: text". Checks that belong to one section live in that section
 * (carrier vs sample rate and window in signal.ts, lifetimes in transitions.ts, fixed thresholds
 * in processing.ts); the ones here need several sections at once.
 */
import type { Scenario, StateSpec } from './types.ts';
import type { ResolveContext } from './context.ts';
import { formatQuantity } from './units.ts';
import { valueAt } from './issues.ts';
import { separationAngle } from '../signal/separation.ts';

/**
 * The states' levels projected on a pipeline's decision axis: the real levels at baseband,
 * else along the separation ('auto') or the given reference phase relative to the carrier.
 */
function projectedLevels(s: Scenario, referencePhase: number | 'auto'): number[] {
  const real = s.states.every((st) => st.level.im === 0);
  const phase = real ? 0 : referencePhase === 'auto' ? separationAngle(s) : referencePhase - s.signal.carrier.phase;
  return s.states.map((st) => st.level.re * Math.cos(phase) + st.level.im * Math.sin(phase));
}

const quote = (st: StateSpec) => `"${st.name}"`;

/**
 * Why a threshold on the projected value cannot separate the outcomes, or null when it can:
 * two states of one outcome on both sides of a state of the other, or states of different
 * outcomes at the same level.
 */
export function separationProblem(s: Scenario, projected: readonly number[]): string | null {
  const outcomeName = (o: number) => JSON.stringify(s.outcomes[o]);
  for (let o = 0; o < 2; o++) {
    const mine = s.states.map((_, i) => i).filter((i) => s.states[i]!.outcome === o);
    const other = s.states.map((_, i) => i).filter((i) => s.states[i]!.outcome !== o);
    for (const c of other) {
      const x = projected[c]!;
      const below = mine.find((i) => projected[i]! < x);
      const above = mine.find((i) => projected[i]! > x);
      if (below !== undefined && above !== undefined) {
        return `states ${quote(s.states[below]!)} and ${quote(s.states[above]!)} (outcome ${outcomeName(o)}) lie on both sides of ${quote(s.states[c]!)} (outcome ${outcomeName(1 - o)})`;
      }
      const same = mine.find((i) => projected[i]! === x);
      if (same !== undefined) {
        return `states ${quote(s.states[same]!)} (outcome ${outcomeName(o)}) and ${quote(s.states[c]!)} (outcome ${outcomeName(1 - o)}) have the same level`;
      }
    }
  }
  return null;
}

/** Warns when no threshold on a pipeline's decision axis can separate the two outcomes. */
export function warnInseparableStates(s: Scenario, ctx: ResolveContext): void {
  const seen = new Set<string>();
  for (const p of s.pipelines) {
    const problem = separationProblem(s, projectedLevels(s, p.referencePhase));
    if (problem === null || seen.has(problem)) continue;
    seen.add(problem);
    const which = s.pipelines.length > 1 ? ` of pipeline "${p.name}"` : '';
    ctx.warn(['states'], `${problem} along the decision axis${which}: no threshold separates the outcomes`);
  }
}

/** Warns when the calibration is expected to see fewer than this many shots of an outcome. */
export const MIN_CALIBRATION_SHOTS_PER_OUTCOME = 10;

/** Warns when the prepared mixture leaves an outcome with (almost) no calibration shots. */
export function warnThinCalibration(s: Scenario, ctx: ResolveContext): void {
  for (let o = 0; o < s.outcomes.length; o++) {
    const weight = s.states.reduce((a, st, i) => a + (st.outcome === o ? s.prepare[i]! : 0), 0);
    const expected = weight * s.calibrationShots;
    if (expected < MIN_CALIBRATION_SHOTS_PER_OUTCOME) {
      ctx.warn(['prepare'], `about ${Number(expected.toPrecision(2))} of ${s.calibrationShots} calibration shots are prepared with outcome ${JSON.stringify(s.outcomes[o])}: the threshold will be poorly set (or the run fails if there are none)`);
    }
  }
}

/** Warns when a preparation or mapping error flips at least half of the shots it applies to. */
export function warnLikelyFlips(s: Scenario, ctx: ResolveContext): void {
  for (const [key, flips] of [['preparationError', s.preparationError], ['mappingError', s.mappingError]] as const) {
    flips.forEach((f, i) => {
      if (f && f.probability >= 0.5) {
        ctx.warn([key, s.states[i]!.name], `probability ${Number(f.probability.toPrecision(3))} (${f.origin}): at least half of these shots end up in ${quote(s.states[f.into]!)}`);
      }
    });
  }
}

/**
 * Warns when a pipeline decimates by D behind a low-pass whose cutoff lies above the Nyquist
 * frequency of the decimated samples, fs/(2D): noise between the two folds into the bins. (A
 * cutoff at or above fs/2 itself is an error of the processing section: no digital design
 * can place it there.)
 */
export function warnDecimationAliasing(s: Scenario, ctx: ResolveContext): void {
  const fs = s.timing.sampleRate;
  const fromList = valueAt(ctx.raw, ['pipelines']) !== undefined;
  s.pipelines.forEach((p, i) => {
    const factor = p.decimate ?? 1;
    const f = p.filter;
    if (factor <= 1 || !f || !('cutoff' in f)) return;
    const nyquist = fs / (2 * factor);
    if (f.cutoff > nyquist && f.cutoff < fs / 2) {
      const key = f.kind === 'single-pole' ? 'singlePole' : f.kind;
      ctx.warn([...(fromList ? ['pipelines', i] : ['processing']), 'filter', key, 'cutoff'],
        `${formatQuantity(f.cutoff, 'Hz')} is above the Nyquist frequency after decimating by ${factor} (${formatQuantity(nyquist, 'Hz')}): noise in between folds into the bins`);
    }
  });
}

/**
 * Warns when a pipeline gives a reference phase (an angle) on one baseband channel (carrier:
 * none): with neither a carrier nor a second channel there is no quadrature to rotate, so the
 * angle has no meaning and the decision is on the record itself. (On baseband I and Q it rotates
 * the IQ plane, as with a carrier.)
 */
export function warnPhaseWithoutCarrier(s: Scenario, ctx: ResolveContext): void {
  if (s.signal.carrier.shape !== 'none') return;
  const fromList = valueAt(ctx.raw, ['pipelines']) !== undefined;
  s.pipelines.forEach((p, i) => {
    if (p.referencePhase === 'auto') return;
    ctx.warn([...(fromList ? ['pipelines', i] : ['processing']), 'referencePhase'],
      'an angle has no meaning on one baseband channel (carrier: none): there is no quadrature to rotate, and the decision is on the record itself; a reference phase needs a carrier, or carrier: baseband-iq for I and Q');
  });
}

/** All cross-section plausibility warnings. */
export function plausibilityWarnings(s: Scenario, ctx: ResolveContext): void {
  warnInseparableStates(s, ctx);
  warnThinCalibration(s, ctx);
  warnLikelyFlips(s, ctx);
  warnDecimationAliasing(s, ctx);
  warnPhaseWithoutCarrier(s, ctx);
}
