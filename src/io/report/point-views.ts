/**
 * Plots of one point: the histogram of integrated values per prepared state with the
 * threshold and the analytic mixture, and example records (raw and demodulated). The values and
 * the example shots are given (app/report.ts reads them from shots.arrow or re-simulates them).
 */
import { extent, envelope, histogramCounts, movingAverage } from '../../analysis/plot-data.ts';
import { mixtureDensity, valueMixture } from '../../analysis/value-density.ts';
import { CAUSES } from '../../analysis/causes.ts';
import { makeReference } from '../../dsp/demodulate.ts';
import { projectKernel } from '../../classify/project.ts';
import type { Scenario } from '../../scenario/types.ts';
import type { Grid } from '../../signal/grid.ts';
import { displayUnit, showValue, withUnit } from './display.ts';
import { demodulatedSpec, histogramSpec, iqScatterSpec, rawTracesSpec, zoomTracesSpec, type TracePlot } from './plots.ts';
import type { PlotSpec } from './svg.ts';
import { causeColour, stateColour } from './theme.ts';

/** Bins of the value histogram. */
export const HISTOGRAM_BINS = 90;

/** What the views read of the point's compiled model (engine/compile-point.ts's CompiledPoint has it). */
export interface PointModel {
  scenario: Pick<Scenario, 'states' | 'signal' | 'preparationError' | 'mappingError'>;
  grid: Pick<Grid, 'samples' | 'sampleRate' | 'windowLo' | 'windowHi'>;
  /** Channels of the record (2: baseband I and Q); records, waveforms and kernels are channel-major. */
  channels: number;
  pipelines: readonly { referencePhase: number; kernels: { inPhase: Float64Array; quadrature: Float64Array | null; lo: number; hi: number } }[];
  waveforms: readonly Float64Array[];
  chain: { rate: Float64Array };
}

/** One example shot to draw: its history and its whole record. */
export interface ExampleRecord {
  /** What the shot shows: "clean" or "jump in window". */
  kind: 'clean' | 'jump';
  intended: number;
  /** State at the record start (after preparation and mapping). */
  initial: number;
  atWindowEnd: number;
  /** Time of the first jump (s), NaN if none. */
  firstJump: number;
  /** Cause code of the first jump if it touched the window (0 otherwise). */
  jumpCause: number;
  /** Per pipeline: the integrated I and Q. */
  values: readonly { inPhase: number; quadrature: number }[];
  record: Float64Array;
}

/** The calibrated reading of one pipeline at the point, from the summary table. */
export interface PointReading {
  pipeline: number;
  axisAngle: number;
  threshold: number;
  sigma: number;
}

/** The histogram plot of a point's values per intended state. */
export function histogramView(c: PointModel, r: PointReading, values: Float64Array[]): PlotSpec | null {
  const sc = c.scenario;
  const [lo0, hi0] = extent(values);
  if (!Number.isFinite(lo0) || !(hi0 > lo0)) return null;
  const pad = 0.03 * (hi0 - lo0);
  const lo = lo0 - pad, hi = hi0 + pad;
  const width = (hi - lo) / HISTOGRAM_BINS;
  const unit = displayUnit(sc.signal.unit, Math.max(Math.abs(lo), Math.abs(hi)));
  const k = c.pipelines[r.pipeline]!.kernels;
  const kernel = projectKernel(k, { cos: Math.cos(r.axisAngle), sin: Math.sin(r.axisAngle) }, c.channels);
  const input = {
    kernel, lo: k.lo, hi: k.hi, sampleRate: c.grid.sampleRate, waveforms: c.waveforms, channels: c.channels, rate: c.chain.rate,
    preparation: sc.preparationError, mapping: sc.mappingError,
  };
  const xs = Float64Array.from({ length: 4 * HISTOGRAM_BINS + 1 }, (_, i) => lo + (i * (hi - lo)) / (4 * HISTOGRAM_BINS));
  let yMax = 1;
  const states = sc.states.map((s, i) => {
    const counts = histogramCounts(values[i]!, lo, hi, HISTOGRAM_BINS);
    const n = values[i]!.length;
    const density = n > 0 && r.sigma > 0 ? mixtureDensity(valueMixture(input, i), r.sigma, xs, new Float64Array(xs.length)) : new Float64Array(xs.length);
    counts.forEach((x) => { yMax = Math.max(yMax, x); });
    return {
      name: s.name, colour: stateColour(i),
      bars: Array.from(counts, (count, b) => ({ x0: (lo + b * width) * unit.factor, x1: (lo + (b + 1) * width) * unit.factor, count })),
      curve: Array.from(xs, (x, j) => ({ x: x * unit.factor, expected: n * width * density[j]! })),
    };
  }).filter((_, i) => values[i]!.length > 0);
  return histogramSpec({
    xTitle: withUnit('integrated value along the separation axis', unit), states, binWidth: showValue(width, sc.signal.unit),
    threshold: r.threshold * unit.factor, thresholdText: showValue(r.threshold, sc.signal.unit),
    domain: [lo * unit.factor, hi * unit.factor], yMax: yMax * 3,
  });
}

/** Most samples a zoom on the carrier shows per shot. */
export const ZOOM_SAMPLES = 400;
/** Carrier periods a zoom shows (fewer when they would hold more than ZOOM_SAMPLES samples). */
export const ZOOM_PERIODS = 4;

/**
 * The noise-free record of a shot: the waveform of its state at the record start until its first
 * jump (which switches at sample ⌈t·fs⌉, as the engines write it), then that of its state at the
 * window end; each state's steady waveform (carrier and gain included).
 */
function noiseFreeRecord(c: PointModel, s: ExampleRecord): Float64Array {
  const n = c.grid.samples;
  const out = new Float64Array(c.channels * n);
  const jump = Number.isFinite(s.firstJump) ? Math.ceil(s.firstJump * c.grid.sampleRate) : n;
  const before = c.waveforms[s.initial]!, after = c.waveforms[s.atWindowEnd]!;
  // each channel's samples in turn (baseband I and Q: I then Q), the jump at the same time in both
  for (let at = 0; at < out.length; at += n) for (let k = 0; k < n; k++) out[at + k] = k < jump ? before[at + k]! : after[at + k]!;
  return out;
}

/** The samples a zoom on the carrier shows: a few carrier periods from the window start (null at baseband). */
function zoomRange(c: PointModel, carrier: number): { lo: number; hi: number; periods: number } | null {
  if (!(carrier > 0)) return null;
  const fs = c.grid.sampleRate;
  const perPeriod = fs / carrier;
  const periods = Math.max(1, Math.min(ZOOM_PERIODS, Math.floor(ZOOM_SAMPLES / perPeriod)));
  const lo = c.grid.windowLo;
  const hi = Math.min(c.grid.samples, lo + Math.max(2, Math.min(ZOOM_SAMPLES, Math.ceil(periods * perPeriod) + 1)));
  return { lo, hi, periods };
}

/** The channels of a baseband I and Q record, for panel titles. */
const IQ_CHANNELS = ['I channel', 'Q channel'] as const;

/** Example-record plots (raw, a zoom on the carrier, demodulated), or null when the point has no example shots. */
export function traceViews(c: PointModel, shots: readonly ExampleRecord[], r: PointReading): { raw: PlotSpec; zoom: PlotSpec | null; zoomNote: string; demodulated: PlotSpec; note: string } | null {
  if (shots.length === 0) return null;
  const sc = c.scenario;
  const fs = c.grid.sampleRate, n = c.grid.samples;
  const { channels } = c;
  const time = displayUnit('s', n / fs);
  const pipeline = c.pipelines[r.pipeline]!;
  const carrier = sc.signal.carrier.frequency;
  const cos = Math.cos(r.axisAngle), sin = Math.sin(r.axisAngle);
  const reference = makeReference(n, fs, carrier, pipeline.referencePhase, channels);
  const width = carrier > 0 ? Math.max(1, Math.round(fs / carrier)) : Math.max(1, Math.round((c.grid.windowHi - c.grid.windowLo) / 25));
  let size = 0;
  for (const s of shots) for (let k = 0; k < channels * n; k++) size = Math.max(size, Math.abs(s.record[k]!));
  const signal = displayUnit(sc.signal.unit, Math.max(size, Math.abs(r.threshold)));
  const demod = new Float64Array(n), smooth = new Float64Array(n);
  const zoom = zoomRange(c, carrier);
  const at = (k: number) => (k / fs) * time.factor;
  const cleans: Float64Array[] = [];
  const plot: TracePlot = {
    timeTitle: withUnit('time from the record start', time),
    rawTitle: signal.label || 'signal',
    demodTitle: withUnit('demodulated, along the axis', signal),
    window: [(c.grid.windowLo / fs) * time.factor, (c.grid.windowHi / fs) * time.factor],
    threshold: r.threshold * signal.factor,
    shots: shots.map((s) => {
      // Σ over the channels of the record times the reference projected on the axis (demodulate.ts)
      for (let k = 0; k < n; k++) {
        demod[k] = reference ? s.record[k]! * (reference.inPhase[k]! * cos + reference.quadrature[k]! * sin) : s.record[k]!;
      }
      for (let at = n; at < channels * n; at += n) {
        for (let k = 0; k < n; k++) demod[k] += s.record[at + k]! * (reference!.inPhase[at + k]! * cos + reference!.quadrature[at + k]! * sin);
      }
      movingAverage(demod, 0, n, width, smooth);
      const raw = envelope(s.record, 0, n, 700);
      const clean = noiseFreeRecord(c, s);
      cleans.push(clean);
      const cleanLine = envelope(clean, 0, n, 700);
      const dm = envelope(smooth, 0, n, 500);
      const name = sc.states[s.intended]!.name;
      const cause = CAUSES[s.jumpCause] ?? 'jump';
      const label = s.kind === 'clean'
        ? `${name} prepared, no jump`
        : `${name} prepared, ${cause} to ${sc.states[s.atWindowEnd]!.name} at ${showValue(s.firstJump, 's')}`;
      const samples = (values: Float64Array, lo: number, hi: number) => Array.from({ length: hi - lo }, (_, j) => ({ t: at(lo + j), v: values[lo + j]! * signal.factor }));
      return {
        label, colour: s.kind === 'clean' ? stateColour(s.intended) : causeColour(cause),
        raw: raw.index.map((k, j) => ({ t: at(k), v: raw.value[j]! * signal.factor })),
        clean: cleanLine.index.map((k, j) => ({ t: at(k), v: cleanLine.value[j]! * signal.factor })),
        zoomRaw: zoom ? samples(s.record, zoom.lo, zoom.hi) : [],
        zoomClean: zoom ? samples(clean, zoom.lo, zoom.hi) : [],
        demod: dm.index.map((k, j) => ({ t: at(k), v: dm.value[j]! * signal.factor })),
        value: (s.values[r.pipeline]!.inPhase * cos + s.values[r.pipeline]!.quadrature * sin) * signal.factor,
      };
    }),
  };
  const smoothing = carrier > 0 ? `a moving average over one carrier period (${showValue(width / fs, 's')})` : `a moving average over ${showValue(width / fs, 's')}`;
  const zoomNote = zoom
    ? `${zoom.periods} carrier period${zoom.periods === 1 ? '' : 's'} (${zoom.hi - zoom.lo} samples, ${showValue((zoom.hi - zoom.lo) / fs, 's')}) from the window start`
    : '';
  return {
    raw: rawTracesSpec(channels > 1 ? perChannel(plot, shots, cleans, n, fs, time.factor, signal.factor) : plot),
    zoom: zoom ? zoomTracesSpec(plot) : null, zoomNote, demodulated: demodulatedSpec(plot), note: smoothing,
  };
}

/** The raw plot of a baseband I and Q record: one panel per shot and channel, each under its noise-free signal. */
function perChannel(
  plot: TracePlot, shots: readonly ExampleRecord[], cleans: readonly Float64Array[], n: number, fs: number, timeFactor: number, signalFactor: number,
): TracePlot {
  const line = (values: Float64Array, c: number) => {
    const e = envelope(values, c * n, (c + 1) * n, 700);
    return e.index.map((k, j) => ({ t: ((k - c * n) / fs) * timeFactor, v: e.value[j]! * signalFactor }));
  };
  return {
    ...plot,
    shots: plot.shots.flatMap((s, i) => IQ_CHANNELS.map((channel, c) => ({
      ...s, label: `${s.label}, ${channel}`, raw: line(shots[i]!.record, c), clean: line(cleans[i]!, c),
    }))),
  };
}

/** Most points per prepared state in the IQ plane (every k-th shot when there are more). */
export const IQ_POINTS = 400;

/** Integrated I and Q of one state's shots. */
export interface StateIq {
  inPhase: Float64Array;
  quadrature: Float64Array;
}

/** What the IQ plane reads of a point: the names of its groups (prepared states, or labelled outcomes) and the signal unit. */
export interface IqModel {
  scenario: { states: readonly { name: string }[]; signal: { unit: string } };
  /** The legend's title (default "prepared state"). */
  groupTitle?: string;
}

/**
 * The IQ-plane scatter of a point: each prepared state's integrated (I, Q), at most IQ_POINTS
 * each (every k-th shot), on equal axes, with the decision line I·cos α + Q·sin α = threshold
 * when `decidesOnIq` (a threshold on the projected integrated value). Null when there is nothing
 * to draw (the caller asks only for a pipeline with a Q output). `shown`/`total`: the shots drawn and read.
 */
export function iqView(c: IqModel, r: PointReading, iq: readonly StateIq[], decidesOnIq: boolean): { spec: PlotSpec; shown: number; total: number } | null {
  const sc = c.scenario;
  const picked = iq.map((v) => {
    const n = v.inPhase.length;
    const step = Math.max(1, Math.ceil(n / IQ_POINTS));
    const idx = Array.from({ length: Math.ceil(n / step) }, (_, j) => j * step);
    return idx.map((k) => ({ i: v.inPhase[k]!, q: v.quadrature[k]! })).filter((pt) => Number.isFinite(pt.i) && Number.isFinite(pt.q));
  });
  const all = picked.flat();
  if (all.length === 0) return null;
  let iLo = Infinity, iHi = -Infinity, qLo = Infinity, qHi = -Infinity;
  for (const pt of all) {
    iLo = Math.min(iLo, pt.i); iHi = Math.max(iHi, pt.i); qLo = Math.min(qLo, pt.q); qHi = Math.max(qHi, pt.q);
  }
  const half = (1.06 * Math.max(iHi - iLo, qHi - qLo)) / 2 || Math.max(Math.abs(iHi), Math.abs(qHi), 1e-30);
  const iMid = (iLo + iHi) / 2, qMid = (qLo + qHi) / 2;
  const unit = displayUnit(sc.signal.unit, Math.max(Math.abs(iMid) + half, Math.abs(qMid) + half));
  const f = unit.factor;
  const cos = Math.cos(r.axisAngle), sin = Math.sin(r.axisAngle);
  // the decision line: through threshold·(cos, sin), along (−sin, cos), long enough to cross the plot (clipped)
  const reach = 4 * half + Math.hypot(iMid, qMid) + Math.abs(r.threshold);
  const line = decidesOnIq && Number.isFinite(r.threshold)
    ? [-1, 1].map((k) => ({ i: (r.threshold * cos - k * reach * sin) * f, q: (r.threshold * sin + k * reach * cos) * f }))
    : null;
  const states = sc.states.map((s, k) => ({ name: s.name, colour: stateColour(k), points: picked[k]!.map((pt) => ({ i: pt.i * f, q: pt.q * f })) }))
    .filter((s) => s.points.length > 0);
  return {
    shown: all.length, total: iq.reduce((a, v) => a + v.inPhase.length, 0),
    spec: iqScatterSpec({
      xTitle: withUnit('I, integrated in-phase value', unit), yTitle: withUnit('Q, integrated quadrature value', unit), states, line, groupTitle: c.groupTitle,
      domain: { i: [(iMid - half) * f, (iMid + half) * f], q: [(qMid - half) * f, (qMid + half) * f] },
    }),
  };
}
