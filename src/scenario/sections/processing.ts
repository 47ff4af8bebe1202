/**
 * Processing section: the lab's decision chain, as one pipeline (`processing`) or a list of
 * named ones (`pipelines`). Every key is optional and defaults to the plain chain: demodulate,
 * average over the timing window (boxcar), threshold.
 *
 * Chain keys (see /work/notes/processing-docs.md for the user text):
 *   window        {start, length}: this pipeline's integration window (default the timing
 *                 window; it must end inside the timing window, which bounds the attribution)
 *   filter        none | {singlePole: {cutoff}} | {butterworth: {order, cutoff}} |
 *                 {fir: {taps, cutoff, window}}  (default none; a block average when decimating)
 *   decimate      integer factor (default 1)
 *   weights       boxcar | matched | optimal (default boxcar)
 *   classifier    threshold | likelihood (default threshold)
 *   threshold     midpoint | optimal | {fixed: level} (threshold classifier only)
 *   ambiguousBand {fraction: f} (total width f·separation) | {width: level} (threshold only)
 */
import { z } from 'zod';
import type { AmbiguousBand, PipelineSpec, StateSpec, TimingSpec } from '../types.ts';
import type { FilterSpec } from '../../dsp/filter-spec.ts';
import { integer, name, number, oneOf, quantity, section, signalQuantity, type ShapeOutput } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import type { KeyPath } from '../issues.ts';
import type { SignalUse } from './states.ts';
import { formatQuantity } from '../units.ts';
import { CLASSIFIERS, classifierNamed, DEFAULT_CLASSIFIER } from '../../classify/registry.ts';
import type { ClassifierKind } from '../../classify/contract.ts';

/** Name of the pipeline made from `processing`, or the default one. */
export const MAIN_PIPELINE = 'main';

/** Relative slack when comparing times computed from different units. */
const SLACK = 1e-9;

const positive = { min: 0, minExclusive: true } as const;

const referencePhaseSchema = z
  .union([z.literal('auto'), quantity('angle', {}, 'Reference phase', '"auto"')], { error: () => '"auto" or an angle (e.g. "30 deg")' })
  .optional()
  .meta({ description: '"auto" (along the state separation) or an angle (default auto)' });

const thresholdSchema = z
  .union([oneOf(['midpoint', 'optimal']), section({ fixed: signalQuantity('signal') })], {
    error: () => '"midpoint", "optimal" or a mapping {fixed: level}',
  })
  .optional()
  .meta({ description: 'midpoint | optimal | {fixed: "60 pA"} (default midpoint)' });

const filterKinds = section({
  singlePole: section({ cutoff: quantity('frequency', positive, 'Analog −3 dB frequency of the RC low-pass') }).optional(),
  butterworth: section({
    order: integer(1, 20),
    cutoff: quantity('frequency', positive, '−3 dB frequency'),
  }).optional(),
  fir: section({
    taps: integer(1, 4095),
    cutoff: quantity('frequency', positive, 'Cutoff (half-gain point of the unwindowed sinc)'),
    window: oneOf(['hamming', 'hann', 'blackman', 'rectangular']).optional().meta({ description: 'Window of the sinc (default hamming)' }),
  }).optional(),
});

const filterSchema = z
  .union([z.literal('none'), filterKinds], {
    error: () => '"none" or a mapping {singlePole: …}, {butterworth: …} or {fir: …}',
  })
  .optional()
  .meta({ description: 'Low-pass after demodulation: none | {singlePole: {cutoff}} | {butterworth: {order, cutoff}} | {fir: {taps, cutoff, window}} (default none; a block average when decimating)' });

const bandSchema = section({
  fraction: number({ min: 0, minExclusive: true, max: 1, maxExclusive: true }).optional(),
  width: signalQuantity('signal', positive, 'Total width of the band in signal units').optional(),
})
  .optional()
  .meta({ description: 'Post-selection: {fraction: 0.1} (total width as a fraction of the separation) or {width: "10 pA"}; shots inside are discarded' });

const windowSchema = section({
  start: quantity('time', { min: 0 }, 'Window start from the record start (default: the timing window start)').optional(),
  length: quantity('time', positive, 'Window length (default: to the timing window end)').optional(),
})
  .optional()
  .meta({ description: "This pipeline's integration window (default the timing window)" });

/** The keys of one pipeline (also read by `analyze` pipeline files). */
export const pipelineChainShape = {
  referencePhase: referencePhaseSchema,
  threshold: thresholdSchema,
  window: windowSchema,
  filter: filterSchema,
  decimate: integer(1, 1_000_000).optional().meta({ description: 'Decimation factor after the filter (default 1)' }),
  weights: oneOf(['boxcar', 'matched', 'optimal']).optional().meta({ description: 'Integration weights over the decimated window (default boxcar)' }),
  classifier: oneOf(CLASSIFIERS.map((k) => k.name) as [string, ...string[]]).optional()
    .meta({ description: `${CLASSIFIERS.map((k) => `${k.name}: ${k.description}`).join('; ')} (default ${DEFAULT_CLASSIFIER})` }),
  ambiguousBand: bandSchema,
};

/** Top-level keys of the processing section. */
export const processingShape = {
  processing: section(pipelineChainShape).optional().meta({ description: 'One processing pipeline, named "main"' }),
  pipelines: z
    .array(section({ name: name(), ...pipelineChainShape }), { error: () => 'a list of pipelines' })
    .min(1, { error: () => 'a list of at least 1 pipeline' })
    .optional()
    .meta({ description: 'Several named pipelines, run on the same shots (instead of processing)' }),
};

/** Validated processing keys. */
export type ProcessingDoc = ShapeOutput<typeof processingShape>;

/** The validated keys of one pipeline (without its name). */
export type ChainDoc = NonNullable<ProcessingDoc['processing']>;

/** The pipelines, and where signal levels (fixed thresholds, band widths) were written. */
export function resolvePipelines(doc: ProcessingDoc, ctx: ResolveContext): { pipelines: PipelineSpec[]; uses: SignalUse[] } {
  if (doc.processing !== undefined && doc.pipelines !== undefined) {
    ctx.fail(['pipelines'], 'either processing or pipelines', 'both');
  }
  const uses: SignalUse[] = [];
  if (doc.pipelines === undefined) {
    return { pipelines: [chainToPipeline(MAIN_PIPELINE, doc.processing ?? {}, ['processing'], uses, ctx)], uses };
  }
  const pipelines: PipelineSpec[] = [];
  doc.pipelines.forEach((p, i) => {
    const earlier = pipelines.findIndex((q) => q.name === p.name);
    if (earlier >= 0) ctx.fail(['pipelines', i, 'name'], `a name not already used (pipelines[${earlier}] is "${p.name}")`);
    pipelines.push(chainToPipeline(p.name, p, ['pipelines', i], uses, ctx));
  });
  return { pipelines, uses };
}

/** One pipeline from its validated keys; `at` is its key path (for messages). */
export function chainToPipeline(pipelineName: string, c: ChainDoc, at: KeyPath, uses: SignalUse[], ctx: ResolveContext): PipelineSpec {
  const classifier = classifierNamed(c.classifier ?? DEFAULT_CLASSIFIER);
  const refused = classifier.refuses;
  if (refused.threshold && c.threshold !== undefined) {
    ctx.fail([...at, 'threshold'], `no threshold with classifier ${classifier.name} (${refused.threshold})`, ctx.found([...at, 'threshold']));
  }
  if (refused.weights && c.weights !== undefined && c.weights !== 'boxcar') {
    ctx.fail([...at, 'weights'], `no integration weights with classifier ${classifier.name} (${refused.weights})`);
  }
  const t = c.threshold ?? 'midpoint';
  let threshold: PipelineSpec['threshold'];
  if (typeof t === 'string') threshold = { method: t, value: 0 };
  else {
    threshold = { method: 'fixed', value: t.fixed.value };
    uses.push({ path: [...at, 'threshold', 'fixed'], unit: t.fixed.unit });
  }
  // Keys left out stay out (the engine fills the defaults), so a plain pipeline resolves as before.
  const spec: PipelineSpec = { name: pipelineName, referencePhase: c.referencePhase ?? 'auto', threshold };
  if (c.weights !== undefined) spec.weights = c.weights;
  if (c.classifier !== undefined) spec.classifier = c.classifier;
  if (c.decimate !== undefined) spec.decimate = c.decimate;
  const band = toBand(c.ambiguousBand, [...at, 'ambiguousBand'], classifier, uses, ctx);
  if (band !== null) spec.ambiguousBand = band;
  const filter = toFilter(c.filter, [...at, 'filter'], ctx);
  if (filter !== undefined) spec.filter = filter;
  if (c.window !== undefined) {
    // resolved against the timing in `checkPipelines`; NaN marks "not given"
    spec.window = { start: c.window.start ?? NaN, length: c.window.length ?? NaN };
  }
  return spec;
}

function toFilter(f: ChainDoc['filter'], at: KeyPath, ctx: ResolveContext): FilterSpec | undefined {
  if (f === undefined) return undefined;
  if (f === 'none') return { kind: 'none' };
  const given = (['singlePole', 'butterworth', 'fir'] as const).filter((k) => f[k] !== undefined);
  if (given.length !== 1) ctx.fail(at, 'exactly one of singlePole, butterworth, fir', given.length === 0 ? 'none of them' : given.join(' and '));
  if (f.singlePole) return { kind: 'single-pole', cutoff: f.singlePole.cutoff };
  if (f.butterworth) return { kind: 'butterworth', order: f.butterworth.order, cutoff: f.butterworth.cutoff };
  const fir = f.fir!;
  return { kind: 'fir', taps: fir.taps, cutoff: fir.cutoff, window: fir.window ?? 'hamming' };
}

function toBand(
  b: ChainDoc['ambiguousBand'], at: KeyPath, classifier: ClassifierKind, uses: SignalUse[], ctx: ResolveContext,
): AmbiguousBand | null {
  if (b === undefined) return null;
  if ((b.fraction === undefined) === (b.width === undefined)) {
    ctx.fail(at, 'either fraction or width', b.fraction === undefined ? 'neither' : 'both');
  }
  if (b.fraction !== undefined) return { kind: 'fraction', value: b.fraction };
  if (classifier.refuses.bandWidth) ctx.fail([...at, 'width'], `fraction (${classifier.refuses.bandWidth})`, ctx.found([...at, 'width']));
  uses.push({ path: [...at, 'width'], unit: b.width!.unit });
  return { kind: 'width', value: b.width!.value };
}

/** Cutoff frequencies of a filter (Hz), for the Nyquist check. */
function cutoffOf(f: FilterSpec): number | null {
  return f.kind === 'single-pole' || f.kind === 'butterworth' || f.kind === 'fir' ? f.cutoff : null;
}

/**
 * Checks each pipeline against the timing (window inside the record and ending inside the
 * timing window, cutoffs below Nyquist, at least one decimated bin, enough calibration shots for
 * optimal weights) and fills the window defaults. Mutates `pipelines`. `root` replaces the key
 * path of the pipeline in messages (a pipeline file of `analyze` has its keys at the top).
 */
export function checkPipelines(
  pipelines: PipelineSpec[], timing: TimingSpec, calibrationShots: number, ctx: ResolveContext, fromList: boolean,
  root?: KeyPath,
): void {
  const fs = timing.sampleRate;
  const t = (x: number) => formatQuantity(x, 's');
  const timingEnd = timing.windowStart + timing.windowLength;
  pipelines.forEach((p, i) => {
    const at: KeyPath = root ?? (fromList ? ['pipelines', i] : ['processing']);
    let start = timing.windowStart;
    let length = timing.windowLength;
    if (p.window !== undefined) {
      start = Number.isNaN(p.window.start) ? timing.windowStart : p.window.start;
      if (start >= timingEnd * (1 - SLACK)) ctx.fail([...at, 'window', 'start'], `a time before the end of the timing window (${t(timingEnd)})`);
      const room = timingEnd - start;
      length = Number.isNaN(p.window.length) ? room : p.window.length;
      if (length > room * (1 + SLACK)) {
        ctx.fail([...at, 'window', 'length'], `a length that ends inside the timing window (at most ${t(room)} after a start of ${t(start)})`);
      }
      if (length * fs < 1 - SLACK) ctx.fail([...at, 'window'], `a window of at least one sample (${t(1 / fs)})`, ctx.found([...at, 'window']));
      p.window = { start, length: Math.min(length, room) };
    }
    if (p.filter) {
      const fc = cutoffOf(p.filter);
      const key = p.filter.kind === 'single-pole' ? 'singlePole' : p.filter.kind;
      if (fc !== null && !(fc < fs / 2)) {
        ctx.fail([...at, 'filter', key, 'cutoff'], `a cutoff below half the sample rate (${formatQuantity(fs / 2, 'Hz')})`);
      }
    }
    const factor = p.decimate ?? 1;
    const samples = Math.round(length * fs);
    const bins = Math.floor(samples / factor);
    if (bins < 1) ctx.fail([...at, 'decimate'], `a factor of at most the window's ${samples} samples`);
    if (factor > 1 && p.filter?.kind === 'none') {
      ctx.warn([...at, 'filter'], `decimating by ${factor} without an anti-alias filter folds the noise above ${formatQuantity(fs / (2 * factor), 'Hz')} into the bins; leave filter out for a block average`);
    }
    if (p.weights === 'optimal' && calibrationShots < 4 * bins) {
      ctx.fail([...at, 'weights'], `calibrationShots ≥ 4 × the ${bins} bins (${4 * bins}) to estimate the noise covariance of optimal weights, or a larger decimate`, `optimal with calibrationShots ${calibrationShots}`);
    }
  });
}

/**
 * Warns when a fixed threshold lies outside the span of the levels: the real levels at
 * baseband, else the levels projected on the reference axis (Re(level·e^(−iφ))), where for
 * 'auto' the axis points from the mean level of the first outcome to that of the second.
 */
export function warnThresholds(
  pipelines: PipelineSpec[],
  states: StateSpec[],
  unit: string,
  ctx: ResolveContext,
  fromList: boolean,
): void {
  pipelines.forEach((p, i) => {
    if (p.threshold.method !== 'fixed') return;
    const real = states.every((s) => s.level.im === 0);
    const phase = real ? 0 : p.referencePhase === 'auto' ? autoPhase(states) : p.referencePhase;
    const projected = states.map((s) => s.level.re * Math.cos(phase) + s.level.im * Math.sin(phase));
    const lo = Math.min(...projected);
    const hi = Math.max(...projected);
    const v = p.threshold.value;
    if (v < lo || v > hi) {
      const path = fromList ? ['pipelines', i, 'threshold', 'fixed'] : ['processing', 'threshold', 'fixed'];
      ctx.warn(path, `${formatQuantity(v, unit)} is outside the span of the levels (${formatQuantity(lo, unit)} to ${formatQuantity(hi, unit)})`);
    }
  });
}

function autoPhase(states: StateSpec[]): number {
  const mean = (outcome: number) => {
    const of = states.filter((s) => s.outcome === outcome);
    return {
      re: of.reduce((a, s) => a + s.level.re, 0) / of.length,
      im: of.reduce((a, s) => a + s.level.im, 0) / of.length,
    };
  };
  const a = mean(0);
  const b = mean(1);
  return Math.atan2(b.im - a.im, b.re - a.re);
}
