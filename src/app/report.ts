/**
 * The report of a run folder, from its tables alone: reads them, picks the operating point,
 * re-simulates the example records, renders every plot to SVG and assembles the page.
 * The same folder always gives the same bytes (no clock, no path, no random state).
 */
import { existsSync, realpathSync, statSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../errors.ts';
import { FolderLock } from '../io/folder-lock.ts';
import { KNOWN_FILES } from '../io/output-dir.ts';
import { checkpoint } from '../run/interrupt.ts';
import { operatingPoints, type PipelineOperatingPoint } from '../analysis/operating-point.ts';
import { compilePoint } from '../engine/compile-point.ts';
import { sweepCombinations, sweepPointAt } from '../run/sweep.ts';
import { describeScenario } from '../scenario/summary.ts';
import type { Scenario } from '../scenario/types.ts';
import { writeFileAtomic } from '../io/atomic-file.ts';
import { probability, short, showValue } from '../io/report/display.ts';
import { NOISE_TABLE, noiseSpectrumView } from '../io/report/noise-view.ts';
import { openRunFolder } from './run-folder.ts';
import { renderPage, type BuiltReport, type Card, type Figure, type SectionView } from '../io/report/page.ts';
import { readAnyManifest } from '../io/manifest.ts';
import { buildAnalysisReport } from './recorded/analysis-report.ts';
import { histogramView, traceViews, type PointReading } from '../io/report/point-views.ts';
import { exampleShots, resimulatedValues } from '../engine/trace/examples.ts';
import { readPointValues, readRunTables, type RunTables, type SummaryRow } from '../io/report/read-run.ts';
import { renderPlot, type PlotSpec } from '../io/report/svg.ts';
import { describeParameters, heatMapView, sweepLineViews } from '../io/report/sweep-views.ts';
import { causeTable, pointsTable, refinementOf } from '../io/report/tables.ts';
import { iqAndAssignment } from './report-iq.ts';

/** The files of a run folder the report reads (each checked against run.json when listed). */
const REPORT_READS = ['summary.arrow', 'budget.arrow', 'shots.arrow', NOISE_TABLE];

export type { BuiltReport };

/** The scenario of one point of the run, rebuilt from the embedded document and the point's swept values. */
export function pointScenario(t: RunTables, row: SummaryRow, gridPoints: number): Scenario {
  const spec = t.scenario.sweep;
  if (!spec) return t.scenario;
  const values = spec.axes.map((a) => row.parameters[a.column]!);
  const indices = spec.axes.map((a, i) => {
    const k = a.values.indexOf(values[i]!);
    return k >= 0 ? k : null;
  });
  const label = row.point < gridPoints ? `sweep point ${row.point}` : `refinement point ${row.point}`;
  return sweepPointAt(t.doc, spec, join(t.dir, 'summary.arrow (embedded scenario)'), values, indices, label).scenario;
}

/** Index of the pipeline whose best point has the lowest error (the one the plots show). */
function featuredPipeline(ops: readonly PipelineOperatingPoint[]): number {
  let k = 0;
  ops.forEach((o, i) => { if (o.lowestError.meanError.rate < ops[k]!.lowestError.meanError.rate) k = i; });
  return k;
}

function interval(r: { low: number; high: number }): string {
  return `95 % interval [${probability(r.low)}, ${probability(r.high)}]`;
}

/**
 * Builds the report page of a finished run folder (or of an analysis folder: analysis-report.ts);
 * an aborted `signal` stops it between steps (RunInterrupted). `verify: false` skips the
 * checksums (the folder a command has just written).
 */
export async function buildReport(dir: string, signal?: AbortSignal, verify = true): Promise<BuiltReport> {
  const manifest = readAnyManifest(dir, true);
  if ('kind' in manifest && manifest.kind === 'analysis') return buildAnalysisReport(dir, manifest, verify);
  if (verify) await openRunFolder(dir, REPORT_READS);
  const t = readRunTables(dir);
  const spec = t.scenario.sweep;
  const axes = spec?.axes ?? [];
  const gridPoints = spec ? sweepCombinations(spec).length : 1;
  const ops = operatingPoints(t.summary.filter((r) => r.point < gridPoints));
  const op = ops[featuredPipeline(ops)]!;
  const rows = t.summary.filter((r) => r.pipeline === op.pipeline);
  const bestRow = rows.find((r) => r.point === op.lowestError.point)!;
  const scenario = pointScenario(t, bestRow, gridPoints);
  const compiled = compilePoint(scenario);
  const reading: PointReading = {
    pipeline: scenario.pipelines.findIndex((p) => p.name === op.pipeline),
    axisAngle: bestRow.axisAngle, threshold: bestRow.threshold, sigma: bestRow.analyticSigma,
  };
  const where = axes.length > 0 ? ` (${describeParameters(axes, bestRow.parameters)})` : '';
  const sections: SectionView[] = [];

  // integrated values
  const values = t.hasShots
    ? await readPointValues(dir, bestRow.point, op.pipeline, scenario.states.map((s) => s.name), () => checkpoint(signal))
    : resimulatedValues(compiled, bestRow.point, reading.pipeline, { cos: Math.cos(reading.axisAngle), sin: Math.sin(reading.axisAngle) });
  const histogram = histogramView(compiled, reading, values);
  const shotsSaid = t.hasShots
    ? `the ${values.reduce((a, v) => a + v.length, 0)} scored shots of point ${bestRow.point}${where}, pipeline "${op.pipeline}"`
    : `${values.reduce((a, v) => a + v.length, 0)} shots re-simulated on the point's auxiliary stream (this run wrote no shots table)`;
  const pending: { section: SectionView; figure: Omit<Figure, 'svg'>; spec: PlotSpec }[] = [];
  const valuesSection: SectionView = { id: 'values', title: 'Integrated values at the lowest-error point', intro: [], figures: [], tables: [] };
  if (histogram) {
    pending.push({
      section: valuesSection, spec: histogram,
      figure: {
        title: 'Histogram by prepared state, with the threshold and the analytic distribution',
        caption: `Bars: ${shotsSaid}, binned by prepared state. Lines: the analytic distribution of each state — a Gaussian of σ = ${showValue(reading.sigma, scenario.signal.unit)} around the noise-free mean, the ramp of shots whose state changed during the window, and the preparation and mapping errors — scaled to the same counts. Dashed: the threshold (${showValue(reading.threshold, scenario.signal.unit)}), calibrated on the point's ${scenario.calibrationShots} calibration shots.`,
      },
    });
  } else valuesSection.note = 'No shots to draw for this point.';
  const { iq, assignment } = await iqAndAssignment(dir, t.hasShots, compiled, bestRow.point, reading);
  if (iq) pending.push({ section: valuesSection, spec: iq.spec, figure: { title: iq.title, caption: iq.caption } });
  valuesSection.tables.push(assignment);
  sections.push(valuesSection);

  // example records
  const traces = traceViews(compiled, exampleShots(compiled, bestRow.point), reading);
  const recordsSection: SectionView = { id: 'records', title: 'Example records', intro: [], figures: [], tables: [] };
  if (traces) {
    recordsSection.intro.push('Shots re-simulated from the embedded scenario on the point\'s auxiliary random stream (never the scored shots; the same every time): one clean shot per prepared state and, where the model has transitions, one whose state changed inside the window. Shaded: the integration window.');
    const rawCaption = compiled.channels > 1
      ? 'Faint: the digitised I and Q channels as synthesised, noise included, one panel per channel (a record longer than 1400 samples is drawn by the lowest and highest sample of each of 700 columns). Dark: the noise-free signal of the shot\'s state in that channel — before and after its first jump.'
      : 'Faint: the digitised record as synthesised, carrier and noise included (a record longer than 1400 samples is drawn by the lowest and highest sample of each of 700 columns). Dark: the noise-free signal of the shot\'s state — before and after its first jump — with the carrier.';
    pending.push({ section: recordsSection, spec: traces.raw, figure: { title: 'Raw records', caption: rawCaption } });
    if (traces.zoom) pending.push({ section: recordsSection, spec: traces.zoom, figure: { title: 'Raw records, zoom on the carrier', caption: `Every sample of ${traces.zoomNote} (faint, joined), and the noise-free signal of the shot's state (dark): the carrier under the noise of single samples, which the integration over the window averages down.` } });
    pending.push({
      section: recordsSection, spec: traces.demodulated,
      figure: { title: 'Demodulated records', caption: `Each record multiplied by the demodulation reference and projected on the separation axis, smoothed by ${traces.note}. Dotted segments: each shot's integrated value over the window; dashed line: the threshold.` },
    });
  } else recordsSection.note = 'No example shots could be drawn for this point.';
  sections.push(recordsSection);

  // sweeps
  if (spec) {
    const lines = sweepLineViews(spec, rows, t.budget.filter((b) => b.pipeline === op.pipeline), op, gridPoints);
    const along: SectionView = {
      id: 'along', title: 'Error along each swept value', figures: [], tables: [],
      intro: [`Points: simulated mean error with its 95 % interval; lines: the analytic budget cause by cause and its exact total (dashed), at the same points. The thin vertical line marks the lowest-error point. Each point's budget is evaluated at that point's own threshold, calibrated on its ${spec.axes.some((a) => a.key === 'calibrationShots') ? '' : `${t.scenario.calibrationShots} `}calibration shots: the calibration's scatter from point to point moves the noise line with it (where it zig-zags, the threshold did), exactly as it moves the simulated errors, which use the same thresholds.`],
    };
    for (const l of lines) {
      pending.push({
        section: along, spec: l.spec,
        figure: { title: `Error along ${l.axis.key}`, caption: l.held ? `Other swept values held at the lowest-error point: ${l.held}.` : spec.combine === 'zip' ? 'All zipped points.' : 'The only swept value.', half: lines.length > 1 },
      });
    }
    sections.push(along);
    const heat = heatMapView(spec, rows, op);
    const maps: SectionView = { id: 'maps', title: 'Error and SNR maps', intro: [], figures: [], tables: [] };
    if (heat) {
      pending.push({
        section: maps, spec: heat.spec,
        figure: { title: `${heat.axes[0].key} × ${heat.axes[1].key}`, caption: `Solid outline: the lowest simulated mean error; dashed outline: the highest simulated SNR.${heat.held ? ` Other swept values held at ${heat.held}.` : ''}` },
      });
    } else maps.note = spec.combine === 'zip' ? 'Zipped values form a path, not a grid: there is no map.' : 'A map needs two swept values with at least two values each.';
    sections.push(maps);
  }

  // noise spectrum
  const noise = noiseSpectrumView(dir, t.files.includes(NOISE_TABLE));
  const spectrum: SectionView = { id: 'spectrum', title: 'Noise spectrum', intro: [], figures: [], tables: [] };
  if ('note' in noise) spectrum.note = noise.note;
  else pending.push({ section: spectrum, spec: noise.spec, figure: { title: 'Noise components', caption: noise.caption } });
  sections.push(spectrum);

  // tables
  sections.push({
    id: 'causes', title: 'Why shots went wrong', figures: [],
    intro: [`At the lowest-error point${where}, pipeline "${op.pipeline}": every wrong shot has one cause, by precedence preparation, mapping, the first transition before the window ends, then noise. The analytic value of each cause comes from the budget; "agrees" means it lies inside the simulated 99.9 % interval.`],
    tables: [{ caption: '', table: causeTable(t.budget, bestRow.point, op.pipeline) }],
  });
  sections.push({
    id: 'points', title: 'Every point', figures: [], intro: [],
    tables: [{ caption: 'Marked: the lowest-error point and the highest-SNR point of the plotted pipeline.', table: pointsTable(t.summary, axes, gridPoints, [op.lowestError.point, op.highestSnr?.point ?? -1], op.pipeline) }],
  });

  // render plots in page order
  const warnings: string[] = [];
  let n = 0;
  for (const p of pending) {
    await checkpoint(signal);
    n++;
    const r = await renderPlot(p.spec, `plot${n}-`);
    warnings.push(...r.warnings);
    p.section.figures.push({ ...p.figure, svg: r.svg });
  }

  const cards: Card[] = [{
    label: 'Lowest simulated mean error', value: probability(op.lowestError.meanError.rate),
    detail: [interval(op.lowestError.meanError), `analytic budget ${probability(op.lowestError.analyticMean)}`, axes.length ? `at ${describeParameters(axes, op.lowestError.parameters)}` : 'the only point', `point ${op.lowestError.point}, pipeline "${op.pipeline}"`],
  }];
  if (op.highestSnr) {
    cards.push({
      label: 'Highest simulated SNR', value: short(op.highestSnr.snr, 3),
      detail: [`mean error there ${probability(op.highestSnr.meanError.rate)} (${interval(op.highestSnr.meanError)})`, axes.length ? `at ${describeParameters(axes, op.highestSnr.parameters)}` : 'the only point', `point ${op.highestSnr.point}; SNR = separation / σ of the integrated value`],
    });
  }
  const refined = spec ? refinementOf(spec, rows, gridPoints) : null;
  if (refined) cards.push(refined.card);
  const verdict: string[] = [];
  if (!spec) verdict.push('Nothing is swept: this run has one point.');
  else if (op.highestSnr && op.differ) {
    const diff = axes.filter((a) => op.lowestError.parameters[a.column] !== op.highestSnr!.parameters[a.column])
      .map((a) => `${a.key} ${showValue(op.lowestError.parameters[a.column]!, a.unit)} for the lowest error, ${showValue(op.highestSnr!.parameters[a.column]!, a.unit)} for the highest SNR`);
    verdict.push(`They differ: ${diff.join('; ')}. Choosing by SNR alone would give a mean error of ${probability(op.highestSnr.meanError.rate)} instead of ${probability(op.lowestError.meanError.rate)}.`);
  } else verdict.push('The lowest error and the highest SNR are at the same point.');
  if (op.indistinguishable.length > 0) {
    verdict.push(`${op.indistinguishable.length} other point${op.indistinguishable.length === 1 ? ' has an error interval' : 's have error intervals'} overlapping the lowest one (point${op.indistinguishable.length === 1 ? '' : 's'} ${op.indistinguishable.slice(0, 8).join(', ')}${op.indistinguishable.length > 8 ? ', …' : ''}): at these shot counts they are not distinguishable from it.`);
  }
  for (const o of ops) {
    if (o === op) continue;
    verdict.push(`Pipeline "${o.pipeline}": lowest error ${probability(o.lowestError.meanError.rate)} at point ${o.lowestError.point}${axes.length ? ` (${describeParameters(axes, o.lowestError.parameters)})` : ''}.`);
  }
  const discard = bestRow.discardFraction;
  const postSelection = discard > 0
    ? `This run post-selects: ${(100 * discard).toPrecision(3)} % of the shots at the lowest-error point were discarded.`
    : 'This run uses no post-selection: every scored shot is counted.';
  const sweepText = spec
    ? `; sweep: ${spec.combine === 'zip' ? `${gridPoints} zipped points` : `grid of ${spec.axes.map((a) => a.values.length).join(' × ')}`} over ${axes.map((a) => a.key).join(', ')}${t.summary.length / Math.max(1, ops.length) > gridPoints ? `, plus ${Math.round(t.summary.length / ops.length) - gridPoints} refinement points` : ''}`
    : '';
  const html = renderPage({
    name: t.scenario.name, description: t.scenario.description,
    summaryLine: describeScenario(t.scenario) + sweepText,
    facts: [
      ['seed', t.provenance.seed], ['points', String(new Set(t.summary.map((r) => r.point)).size)],
      ['shots per point', String(bestRow.shots)], ['pipelines', String(ops.length)],
      ['engine', t.provenance.engine], ['tool version', t.provenance.version], ['shard', t.provenance.shard],
    ],
    postSelection, cards, verdict, sections,
    scenarioJson: JSON.stringify(t.doc, null, 2),
  });
  return { html, warnings, plots: n };
}

/**
 * Builds the report of a run folder and writes it to `out` (default DIR/report.html), replacing
 * a file there; returns the path. The commands that write a run folder call it on their staging
 * folder; `reportFolder` is the `report` command.
 */
export async function writeReport(dir: string, out = join(dir, 'report.html'), signal?: AbortSignal): Promise<{ path: string; report: BuiltReport }> {
  const report = await buildReport(dir, signal, false);
  await checkpoint(signal);
  writeFileAtomic(out, report.html);
  return { path: out, report };
}

export interface ReportOptions {
  /** The finished run folder. */
  dir: string;
  /** Where the page goes (default DIR/report.html). */
  out?: string;
  /** Replace a file that is there already. */
  force?: boolean;
  signal?: AbortSignal;
}

/**
 * The `report` command: holds the run folder's lock while it reads the tables and writes the
 * page, atomically; never replaces a file without `force`, and never one of the run's own tables
 * or records (run.json, tallies.json, the .arrow files), even with it.
 */
export async function reportFolder(o: ReportOptions): Promise<{ path: string; report: BuiltReport }> {
  const out = o.out ?? join(o.dir, 'report.html');
  if (out.trim() === '') throw new InputError('--out', '', 'a file path for the page', 'an empty string');
  if (existsSync(out) && statSync(out).isDirectory()) throw new InputError(out, '', 'a file path for the page (--out names the file, not a folder)', 'a folder');
  const sameFolder = realpathOrNull(dirname(out)) !== null && realpathOrNull(dirname(out)) === realpathOrNull(o.dir);
  if (sameFolder && basename(out) !== 'report.html' && (KNOWN_FILES as readonly string[]).includes(basename(out))) {
    throw new InputError(out, '', 'a page name that is not one of the run\'s own files', `${basename(out)}, which the run's tables need`);
  }
  if (!existsSync(o.dir) || !statSync(o.dir).isDirectory()) throw new InputError(o.dir, '', 'a run folder', 'no such folder');
  const lock = FolderLock.take(o.dir, 'report');
  try {
    const report = await buildReport(o.dir, o.signal);
    await checkpoint(o.signal);
    writeFileAtomic(out, report.html, { replace: o.force ?? false });
    return { path: out, report };
  } finally {
    lock.release();
  }
}

function realpathOrNull(path: string): string | null {
  try {
    return realpathSync(path);
  } catch {
    return null;
  }
}
