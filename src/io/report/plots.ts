/**
 * The report's plots as vega-lite specifications (plain data; svg.ts renders them). Each
 * builder takes values already in display units and returns one spec. Layout constants keep
 * every plot on the page's grid.
 */
import type { PlotSpec } from './svg.ts';
import { ERROR_RAMP, PALETTE, SNR_RAMP, SPECTRUM_COLOURS, causeColour } from './theme.ts';

/** Inner width of a full-width plot (px); the page column is a little wider. */
export const FULL_WIDTH = 820;
/** Inner width of each of two plots side by side. */
export const HALF_WIDTH = 330;

/** Tick values of a log axis on [lo, hi]: the decades, with 2× and 5× when there are few. */
export function logTicks(lo: number, hi: number): number[] {
  if (!(lo > 0) || !(hi > lo)) return [];
  const out: number[] = [];
  const steps = Math.log10(hi / lo) < 2.5 ? [1, 2, 5] : [1];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    for (const m of steps) {
      const v = Number(`${m}e${e}`);
      if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) out.push(v);
    }
  }
  return out;
}

/** Histogram of the integrated value: simulated bars and analytic expected counts per state. */
export interface HistogramPlot {
  xTitle: string;
  /** The bin width as read ("1.25 pA"), shown in the count axis's title. */
  binWidth: string;
  states: { name: string; colour: string; bars: { x0: number; x1: number; count: number }[]; curve: { x: number; expected: number }[] }[];
  threshold: number;
  /** The threshold as read ("56.68 pA"), written beside its line. */
  thresholdText: string;
  domain: [number, number];
  yMax: number;
  /** The legend's title (default "prepared state"). */
  groupTitle?: string;
}

/** The floor of the log count axis: bars start here, curves below it are clipped. */
const COUNT_FLOOR = 0.1;

/**
 * Histogram spec: bars per state on a log count axis, analytic curves, the threshold with its
 * value, the bin width in the count axis's title. The legend sits above the plot area, so it
 * covers no bar.
 */
export function histogramSpec(p: HistogramPlot): PlotSpec {
  const names = p.states.map((s) => s.name);
  const colour = { field: 'state', type: 'nominal', scale: { domain: names, range: p.states.map((s) => s.colour) }, legend: { title: p.groupTitle ?? 'prepared state', orient: 'top', direction: 'horizontal' } };
  const bars = p.states.flatMap((s) => s.bars.filter((b) => b.count > 0).map((b) => ({ state: s.name, ...b })));
  const curve = p.states.flatMap((s) => s.curve.filter((c) => c.expected >= COUNT_FLOOR).map((c) => ({ state: s.name, ...c })));
  const x = { type: 'quantitative', scale: { domain: p.domain, nice: false, zero: false } };
  return {
    width: FULL_WIDTH, height: 300,
    layer: [
      {
        data: { values: bars }, mark: { type: 'rect', opacity: 0.5, stroke: null },
        encoding: {
          x: { field: 'x0', ...x, title: p.xTitle }, x2: { field: 'x1' },
          y: {
            field: 'count', type: 'quantitative', title: `shots per bin of ${p.binWidth} (log scale)`, scale: { type: 'log', domain: [COUNT_FLOOR, p.yMax], nice: false },
            axis: { values: logTicks(1, p.yMax), format: '~s' },
          },
          y2: { datum: COUNT_FLOOR }, color: colour,
        },
      },
      {
        data: { values: curve }, mark: { type: 'line', strokeWidth: 2, clip: true, interpolate: 'monotone' },
        encoding: { x: { field: 'x', ...x }, y: { field: 'expected', type: 'quantitative' }, color: colour, detail: { field: 'state' } },
      },
      {
        data: { values: [{ t: p.threshold }] }, mark: { type: 'rule', color: PALETTE.ink, strokeDash: [6, 4], strokeWidth: 1.5 },
        encoding: { x: { field: 't', type: 'quantitative' } },
      },
      {
        data: { values: [{ t: p.threshold, label: `threshold ${p.thresholdText}` }] },
        mark: { type: 'text', align: 'left', baseline: 'top', dx: 5, dy: 4, color: PALETTE.ink, fontSize: 11 },
        encoding: { x: { field: 't', type: 'quantitative' }, y: { datum: p.yMax }, text: { field: 'label' } },
      },
    ],
  };
}

/** Example records: one small raw panel per shot, and their demodulated traces together. */
export interface TracePlot {
  timeTitle: string;
  rawTitle: string;
  demodTitle: string;
  window: [number, number];
  shots: {
    label: string; colour: string;
    /** The record as digitised (envelope of the whole record) and the noise-free signal of the shot's states. */
    raw: { t: number; v: number }[]; clean: { t: number; v: number }[];
    /** Every sample of a few carrier periods, digitised and noise-free (empty at baseband). */
    zoomRaw: { t: number; v: number }[]; zoomClean: { t: number; v: number }[];
    demod: { t: number; v: number }[]; value: number;
  }[];
  threshold: number;
}

const windowBand = (w: [number, number]) => ({
  data: { values: [{ a: w[0], b: w[1] }] }, mark: { type: 'rect', color: PALETTE.window, opacity: 1 },
  encoding: { x: { field: 'a', type: 'quantitative' }, x2: { field: 'b' } },
});

/** One panel per example shot: the digitised record (faint, in the shot's colour) under its noise-free signal (ink). */
function recordPanels(p: TracePlot, pick: (s: TracePlot['shots'][number]) => { raw: { t: number; v: number }[]; clean: { t: number; v: number }[] }, height: number, band: boolean): PlotSpec {
  return {
    spacing: 6,
    vconcat: p.shots.map((s, i) => {
      const last = i === p.shots.length - 1;
      const x = { field: 't', type: 'quantitative', title: last ? p.timeTitle : null, axis: last ? {} : { labels: false, ticks: false }, scale: { nice: false, zero: false } };
      const y = { field: 'v', type: 'quantitative', title: null, axis: { tickCount: 3 }, scale: { zero: false } };
      const { raw, clean } = pick(s);
      return {
        width: FULL_WIDTH, height,
        title: { text: `${s.label}${p.rawTitle ? ` · ${p.rawTitle}` : ''}`, fontSize: 11, fontWeight: 'normal', color: PALETTE.muted, offset: 4 },
        layer: [
          ...(band ? [windowBand(p.window)] : []),
          { data: { values: raw }, mark: { type: 'line', strokeWidth: 0.9, color: s.colour, opacity: 0.55 }, encoding: { x, y } },
          // recorded traces have no noise-free signal to draw
          ...(clean.length > 0 ? [{ data: { values: clean }, mark: { type: 'line', strokeWidth: 1.4, color: PALETTE.ink }, encoding: { x, y } }] : []),
        ],
      };
    }),
  };
}

/** Raw-record spec: one small panel per example shot over the whole record, the window shaded, the noise-free signal on top. */
export function rawTracesSpec(p: TracePlot): PlotSpec {
  return recordPanels(p, (s) => ({ raw: s.raw, clean: s.clean }), 70, true);
}

/** Zoom on the carrier: every sample of a few carrier periods per example shot, with the noise-free signal. */
export function zoomTracesSpec(p: TracePlot): PlotSpec {
  return recordPanels(p, (s) => ({ raw: s.zoomRaw, clean: s.zoomClean }), 80, false);
}

/** Demodulated-record spec: all example shots together, each integrated value and the threshold. */
export function demodulatedSpec(p: TracePlot): PlotSpec {
  const labels = p.shots.map((s) => s.label);
  const colour = { field: 'shot', type: 'nominal', scale: { domain: labels, range: p.shots.map((s) => s.colour) }, legend: { title: null, orient: 'bottom', direction: 'vertical', labelLimit: 600 } };
  const lines = p.shots.flatMap((s) => s.demod.map((d) => ({ shot: s.label, ...d })));
  const values = p.shots.map((s) => ({ shot: s.label, a: p.window[0], b: p.window[1], v: s.value }));
  return {
    width: FULL_WIDTH, height: 220,
    layer: [
      windowBand(p.window),
      {
        data: { values: lines }, mark: { type: 'line', strokeWidth: 1.4 },
        encoding: {
          x: { field: 't', type: 'quantitative', title: p.timeTitle, scale: { nice: false, zero: false } },
          y: { field: 'v', type: 'quantitative', title: p.demodTitle, scale: { zero: false } }, color: colour,
        },
      },
      {
        data: { values }, mark: { type: 'rule', strokeWidth: 2.5, strokeDash: [2, 2] },
        encoding: { x: { field: 'a', type: 'quantitative' }, x2: { field: 'b' }, y: { field: 'v', type: 'quantitative' }, color: colour },
      },
      {
        data: { values: [{ v: p.threshold }] }, mark: { type: 'rule', color: PALETTE.ink, strokeDash: [6, 4], strokeWidth: 1.2 },
        encoding: { y: { field: 'v', type: 'quantitative' } },
      },
    ],
  };
}

/** Integrated values in the IQ plane: one cloud per prepared state, and the decision line. */
export interface IqPlot {
  xTitle: string;
  yTitle: string;
  states: { name: string; colour: string; points: { i: number; q: number }[] }[];
  /** Two points of the decision line (display units), or null when the decision is not a line in the plane. */
  line: { i: number; q: number }[] | null;
  /** Equal spans on both axes, so that angles read true. */
  domain: { i: [number, number]; q: [number, number] };
  /** The legend's title (default "prepared state"). */
  groupTitle?: string;
}

/** Side of the square IQ plot (px). */
export const IQ_SIZE = 420;

/** IQ-plane spec: the clouds of integrated (I, Q) per prepared state on equal axes, the decision line dashed. */
export function iqScatterSpec(p: IqPlot): PlotSpec {
  const names = p.states.map((s) => s.name);
  const colour = { field: 'state', type: 'nominal', scale: { domain: names, range: p.states.map((s) => s.colour) }, legend: { title: p.groupTitle ?? 'prepared state', orient: 'right', direction: 'vertical', symbolOpacity: 1 } };
  const x = { field: 'i', type: 'quantitative', title: p.xTitle, scale: { domain: p.domain.i, nice: false, zero: false } };
  const y = { field: 'q', type: 'quantitative', title: p.yTitle, scale: { domain: p.domain.q, nice: false, zero: false } };
  const layer: unknown[] = [{
    data: { values: p.states.flatMap((s) => s.points.map((pt) => ({ state: s.name, ...pt }))) },
    mark: { type: 'point', filled: true, size: 9, opacity: 0.4, clip: true, aria: false },
    encoding: { x, y, color: colour },
  }];
  if (p.line) {
    layer.push({
      data: { values: p.line.map((pt, k) => ({ ...pt, k })) }, mark: { type: 'line', color: PALETTE.ink, strokeDash: [6, 4], strokeWidth: 1.5, clip: true },
      encoding: { x, y, order: { field: 'k', type: 'quantitative' } },
    });
  }
  return { width: IQ_SIZE, height: IQ_SIZE, layer };
}

/** Error along one swept value: simulated points with interval bars, one analytic line per cause. */
export interface SweepLinePlot {
  xTitle: string;
  logX: boolean;
  simulated: { x: number; rate: number; low: number; high: number; kind: string }[];
  analytic: { x: number; cause: string; value: number }[];
  causes: string[];
  best: number | null;
  yDomain: [number, number];
}

/** Error-along-a-swept-value spec: simulated points with interval bars and analytic lines per cause. */
export function sweepLineSpec(p: SweepLinePlot): PlotSpec {
  const xs = [...new Set(p.simulated.map((d) => d.x))].sort((a, b) => a - b);
  const xAxis = p.logX && xs.length <= 12 ? { values: xs, format: '.3~g', labelAngle: 0 } : { format: '.3~g' };
  const x = { field: 'x', type: 'quantitative', title: p.xTitle, axis: xAxis, scale: p.logX ? { type: 'log', nice: false, padding: 8 } : { type: 'linear', zero: false, padding: 8 } };
  const y = { type: 'quantitative', scale: { type: 'log', domain: p.yDomain, nice: false }, axis: { values: logTicks(p.yDomain[0], p.yDomain[1]), format: '.0e' } };
  const legend = { orient: 'bottom', direction: 'horizontal', columns: 4, columnPadding: 12 };
  const causeEncoding = { field: 'cause', type: 'nominal', title: 'analytic', scale: { domain: p.causes, range: p.causes.map(causeColour) }, legend };
  const layer: unknown[] = [];
  if (p.best !== null) {
    layer.push({
      data: { values: [{ x: p.best }] }, mark: { type: 'rule', color: PALETTE.accent, strokeDash: [2, 3], strokeWidth: 1.2 },
      encoding: { x },
    });
  }
  layer.push(
    {
      data: { values: p.analytic }, mark: { type: 'line', strokeWidth: 1.8, clip: true },
      encoding: {
        x, y: { field: 'value', ...y, title: 'mean error (log scale)' }, color: causeEncoding,
        strokeDash: { condition: { test: "datum.cause === 'total'", value: [6, 3] }, value: [1, 0] },
      },
    },
    {
      data: { values: p.simulated }, mark: { type: 'rule', color: PALETTE.ink, strokeWidth: 1.4, clip: true },
      encoding: { x, y: { field: 'low', ...y }, y2: { field: 'high' } },
    },
    {
      data: { values: p.simulated }, mark: { type: 'point', size: 46, strokeWidth: 1.5, clip: true, filled: true, color: PALETTE.ink },
      encoding: {
        x, y: { field: 'rate', ...y },
        shape: { field: 'kind', type: 'nominal', title: 'simulated', scale: { domain: ['grid point', 'refinement'], range: ['circle', 'diamond'] }, legend },
      },
    },
  );
  return { width: HALF_WIDTH, height: 220, layer, resolve: { scale: { color: 'independent', shape: 'independent' } } };
}

/** Error and SNR maps over two swept values, with both optima outlined on each (solid: lowest error, dashed: highest SNR). */
export interface HeatPlot {
  xTitle: string;
  yTitle: string;
  xLabels: string[];
  yLabels: string[];
  cells: { x: string; y: string; error: number; errorText: string; snr: number; snrText: string; errorInk: string; snrInk: string }[];
  optima: { x: string; y: string; which: string }[];
}

function heatLayer(p: HeatPlot, field: 'error' | 'snr', title: string, ramp: string[], log: boolean): PlotSpec {
  const x = { field: 'x', type: 'ordinal', title: p.xTitle, sort: p.xLabels, axis: { labelAngle: 0 } };
  const y = { field: 'y', type: 'ordinal', title: p.yTitle, sort: [...p.yLabels].reverse() };
  const cell = Math.max(40, Math.min(90, Math.floor((FULL_WIDTH - 80) / Math.max(1, p.xLabels.length))));
  return {
    width: cell * p.xLabels.length, height: Math.min(300, 38 * p.yLabels.length),
    title: { text: title },
    layer: [
      {
        data: { values: p.cells }, mark: { type: 'rect', stroke: '#ffffff', strokeWidth: 1 },
        encoding: { x, y, color: { field, type: 'quantitative', title: null, scale: log ? { type: 'log', range: ramp } : { type: 'linear', range: ramp, zero: false }, legend: { orient: 'right', gradientLength: Math.max(60, Math.min(300, 38 * p.yLabels.length)), format: log ? '.0e' : '.3~g' } } },
      },
      {
        data: { values: p.cells }, mark: { type: 'text', fontSize: 11 },
        encoding: { x, y, text: { field: `${field}Text` }, color: { field: `${field}Ink`, type: 'nominal', scale: null } },
      },
      ...(['lowest error', 'highest SNR'] as const).flatMap((which) => {
        const values = p.optima.filter((o) => o.which === which);
        const dash = which === 'lowest error' ? [1, 0] : [5, 3];
        return values.length === 0 ? [] : [
          { data: { values }, mark: { type: 'rect', filled: false, stroke: '#ffffff', strokeWidth: 6, strokeDash: dash }, encoding: { x, y } },
          { data: { values }, mark: { type: 'rect', filled: false, stroke: PALETTE.ink, strokeWidth: 3, strokeDash: dash }, encoding: { x, y } },
        ];
      }),
    ],
    resolve: { scale: { color: 'independent' } },
  };
}

/** The two maps (mean error above, SNR below) over two swept values. */
export function heatMapsSpec(p: HeatPlot): PlotSpec {
  return {
    vconcat: [heatLayer(p, 'error', 'simulated mean error', ERROR_RAMP, true), heatLayer(p, 'snr', 'simulated SNR (separation / σ)', SNR_RAMP, false)],
    spacing: 28,
    resolve: { scale: { color: 'independent' } },
  };
}

/** Noise spectrum: one-sided PSD of each component and their sum, log–log. */
export interface SpectrumPlot {
  yTitle: string;
  components: { name: string; f: number; psd: number }[];
}

/** Noise spectrum spec: one line per component, log–log. */
export function spectrumSpec(p: SpectrumPlot): PlotSpec {
  const names = [...new Set(p.components.map((c) => c.name))];
  return {
    width: FULL_WIDTH, height: 260,
    data: { values: p.components.filter((c) => c.f > 0 && c.psd > 0) },
    mark: { type: 'line', strokeWidth: 1.8 },
    encoding: {
      x: { field: 'f', type: 'quantitative', title: 'frequency (Hz, log scale)', scale: { type: 'log' } },
      y: { field: 'psd', type: 'quantitative', title: p.yTitle, scale: { type: 'log' } },
      color: { field: 'name', type: 'nominal', title: 'component', scale: { domain: names, range: names.map((_, i) => SPECTRUM_COLOURS[i % SPECTRUM_COLOURS.length]) } },
    },
  };
}
