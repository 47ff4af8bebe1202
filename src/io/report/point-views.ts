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
import { demodulatedSpec, histogramSpec, rawTracesSpec, type TracePlot } from './plots.ts';
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
    xTitle: withUnit('integrated value along the separation axis', unit), states,
    threshold: r.threshold * unit.factor, domain: [lo * unit.factor, hi * unit.factor], yMax: yMax * 3,
  });
}

/** The channels of a baseband I and Q record, for panel titles. */
const IQ_CHANNELS = ['I channel', 'Q channel'] as const;

/** Example-record plots (raw and demodulated), or null when the point has no example shots. */
export function traceViews(c: PointModel, shots: readonly ExampleRecord[], r: PointReading): { raw: PlotSpec; demodulated: PlotSpec; note: string } | null {
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
      const dm = envelope(smooth, 0, n, 500);
      const name = sc.states[s.intended]!.name;
      const cause = CAUSES[s.jumpCause] ?? 'jump';
      const label = s.kind === 'clean'
        ? `${name} prepared, no jump`
        : `${name} prepared, ${cause} to ${sc.states[s.atWindowEnd]!.name} at ${showValue(s.firstJump, 's')}`;
      return {
        label, colour: s.kind === 'clean' ? stateColour(s.intended) : causeColour(cause),
        raw: raw.index.map((k, j) => ({ t: (k / fs) * time.factor, v: raw.value[j]! * signal.factor })),
        demod: dm.index.map((k, j) => ({ t: (k / fs) * time.factor, v: dm.value[j]! * signal.factor })),
        value: (s.values[r.pipeline]!.inPhase * cos + s.values[r.pipeline]!.quadrature * sin) * signal.factor,
      };
    }),
  };
  const smoothing = carrier > 0 ? `a moving average over one carrier period (${showValue(width / fs, 's')})` : `a moving average over ${showValue(width / fs, 's')}`;
  return { raw: rawTracesSpec(channels > 1 ? perChannel(plot, shots, n, fs, time.factor, signal.factor) : plot), demodulated: demodulatedSpec(plot), note: smoothing };
}

/** The raw plot of a baseband I and Q record: one panel per shot and channel. */
function perChannel(plot: TracePlot, shots: readonly ExampleRecord[], n: number, fs: number, timeFactor: number, signalFactor: number): TracePlot {
  return {
    ...plot,
    shots: plot.shots.flatMap((s, i) => IQ_CHANNELS.map((channel, c) => {
      const raw = envelope(shots[i]!.record, c * n, (c + 1) * n, 700);
      return {
        ...s, label: `${s.label}, ${channel}`,
        raw: raw.index.map((k, j) => ({ t: ((k - c * n) / fs) * timeFactor, v: raw.value[j]! * signalFactor })),
      };
    })),
  };
}
