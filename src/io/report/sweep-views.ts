/**
 * Plots across sweep points: the error along each swept value (a slice through the
 * lowest-error point: the other swept values held at its values), and the error and SNR maps
 * over the first two swept values with both optima marked.
 */
import { sliceThrough } from '../../analysis/plot-data.ts';
import type { PipelineOperatingPoint } from '../../analysis/operating-point.ts';
import type { SweepAxis, SweepSpec } from '../../scenario/types.ts';
import { displayUnit, probability, short, showValue, withUnit } from './display.ts';
import { heatMapsSpec, sweepLineSpec } from './plots.ts';
import type { BudgetRow, SummaryRow } from './read-run.ts';
import type { PlotSpec } from './svg.ts';
import { CAUSE_COLOURS } from './theme.ts';

/** One plot along one swept value. */
export interface SweepLineView {
  axis: SweepAxis;
  spec: PlotSpec;
  /** What the other swept values are held at ('' when nothing else is swept or the points are zipped). */
  held: string;
}

/** Whether a positive axis spans enough decades to be drawn on a log scale. */
function wantsLog(axis: SweepAxis, xs: readonly number[]): boolean {
  if (xs.some((x) => !(x > 0))) return false;
  if (axis.spacing === 'log') return true;
  return Math.max(...xs) / Math.min(...xs) >= 5;
}

/** "key = value, key = value" for the given axes at a point's parameters. */
export function describeParameters(axes: readonly SweepAxis[], parameters: Record<string, number>): string {
  return axes.map((a) => `${a.key} = ${showValue(parameters[a.column]!, a.unit)}`).join(', ');
}

/** Analytic causes worth a line: those with a non-zero value somewhere on the plot. */
function causesOn(budget: readonly BudgetRow[]): string[] {
  const order = [...Object.keys(CAUSE_COLOURS).filter((c) => c !== 'total'), 'total'];
  const present = new Set(budget.filter((b) => b.analytic > 0).map((b) => b.cause));
  const known = order.filter((c) => present.has(c));
  const extra = [...present].filter((c) => !order.includes(c)).sort();
  return [...known.filter((c) => c !== 'total'), ...extra, ...(present.has('total') ? ['total'] : [])];
}

/** The error-along-each-swept-value plots of one pipeline. */
export function sweepLineViews(
  spec: SweepSpec, rows: readonly SummaryRow[], budget: readonly BudgetRow[], best: PipelineOperatingPoint, gridPoints: number,
): SweepLineView[] {
  const values = rows.map((r) => spec.axes.map((a) => r.parameters[a.column]!));
  const through = rows.findIndex((r) => r.point === best.lowestError.point);
  return spec.axes.map((axis, a) => {
    const on = spec.combine === 'zip' ? rows.map((_, i) => i) : sliceThrough(values, through, a);
    const line = on.map((i) => rows[i]!).sort((p, q) => p.parameters[axis.column]! - q.parameters[axis.column]!);
    const xs = line.map((r) => r.parameters[axis.column]!);
    const unit = displayUnit(axis.unit, Math.max(...xs.map(Math.abs)));
    const points = new Set(line.map((r) => r.point));
    const mine = budget.filter((b) => points.has(b.point) && b.state === 'all');
    const causes = causesOn(mine);
    const xOf = new Map(line.map((r) => [r.point, r.parameters[axis.column]! * unit.factor]));
    const analytic = mine.filter((b) => causes.includes(b.cause) && b.analytic > 0)
      .map((b) => ({ x: xOf.get(b.point)!, cause: b.cause, value: b.analytic }))
      .sort((p, q) => p.x - q.x);
    const simulated = line.map((r) => ({
      x: r.parameters[axis.column]! * unit.factor, rate: r.meanError.rate, low: r.meanError.low, high: r.meanError.high,
      kind: r.point >= gridPoints ? 'refinement' : 'grid point',
    }));
    const positive = [...simulated.flatMap((s) => [s.rate, s.low, s.high]), ...analytic.map((p) => p.value)].filter((v) => v > 0);
    const floor = positive.length > 0 ? Math.min(...positive) / 2 : 1e-6;
    const top = positive.length > 0 ? Math.min(1, Math.max(...positive) * 2) : 1;
    for (const s of simulated) {
      if (!(s.low > 0)) s.low = floor;
      if (!(s.rate > 0)) s.rate = floor;
    }
    const others = spec.axes.filter((_, k) => k !== a);
    const held = spec.combine === 'zip' || others.length === 0 ? '' : describeParameters(others, best.lowestError.parameters);
    return {
      axis, held,
      spec: sweepLineSpec({
        xTitle: withUnit(axis.key, unit), logX: wantsLog(axis, xs), simulated, analytic, causes,
        best: xOf.get(best.lowestError.point) ?? null, yDomain: [floor, top],
      }),
    };
  });
}

/** Text colour that reads on a ramp cell at relative position t (0 = first colour). */
function inkOn(t: number, darkFirst: boolean): string {
  const dark = darkFirst ? t < 0.45 : t > 0.55;
  return dark ? '#ffffff' : '#22303c';
}

/** The two maps over the first two swept values (others held at the optimum), or null. */
export function heatMapView(
  spec: SweepSpec, rows: readonly SummaryRow[], best: PipelineOperatingPoint,
): { spec: PlotSpec; held: string; axes: [SweepAxis, SweepAxis] } | null {
  if (spec.combine !== 'grid') return null;
  const axes = spec.axes.filter((a) => a.values.length >= 2);
  if (axes.length < 2) return null;
  const [ax, ay] = [axes[0]!, axes[1]!];
  const others = spec.axes.filter((a) => a !== ax && a !== ay);
  const at = best.lowestError.parameters;
  const grid = rows.filter((r) => others.every((o) => r.parameters[o.column] === at[o.column]))
    .filter((r) => ax.values.includes(r.parameters[ax.column]!) && ay.values.includes(r.parameters[ay.column]!));
  if (grid.length === 0) return null;
  const ux = displayUnit(ax.unit, Math.max(...ax.values.map(Math.abs)));
  const uy = displayUnit(ay.unit, Math.max(...ay.values.map(Math.abs)));
  const xLabel = (v: number) => short(v * ux.factor, 3);
  const yLabel = (v: number) => short(v * uy.factor, 3);
  const xs = [...new Set(ax.values)].sort((p, q) => p - q);
  const ys = [...new Set(ay.values)].sort((p, q) => p - q);
  const errors = grid.map((r) => r.meanError.rate).filter((e) => e > 0);
  const floor = errors.length > 0 ? Math.min(...errors) / 2 : 1e-6;
  const logRange = [Math.log(floor), Math.log(Math.max(floor * 2, ...errors))];
  const snrs = grid.map((r) => r.snr).filter(Number.isFinite);
  const snrRange = [Math.min(...snrs), Math.max(...snrs)];
  const cells = grid.map((r) => {
    const e = r.meanError.rate > 0 ? r.meanError.rate : floor;
    const te = (Math.log(e) - logRange[0]!) / ((logRange[1]! - logRange[0]!) || 1);
    const ts = (r.snr - snrRange[0]!) / ((snrRange[1]! - snrRange[0]!) || 1);
    return {
      x: xLabel(r.parameters[ax.column]!), y: yLabel(r.parameters[ay.column]!),
      error: e, errorText: r.meanError.rate > 0 ? probability(r.meanError.rate) : '0', errorInk: inkOn(te, true),
      snr: Number.isFinite(r.snr) ? r.snr : snrRange[0]!, snrText: short(r.snr, 3), snrInk: inkOn(ts, false),
    };
  });
  const mark = (p: Record<string, number>, which: string) => ({ x: xLabel(p[ax.column]!), y: yLabel(p[ay.column]!), which });
  const optima = [mark(best.lowestError.parameters, 'lowest error')];
  if (best.highestSnr) optima.push(mark(best.highestSnr.parameters, 'highest SNR'));
  return {
    axes: [ax, ay],
    held: describeParameters(others, at),
    spec: heatMapsSpec({
      xTitle: withUnit(ax.key, ux), yTitle: withUnit(ay.key, uy), xLabels: xs.map(xLabel), yLabels: ys.map(yLabel), cells, optima,
    }),
  };
}
