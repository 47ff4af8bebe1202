/**
 * The report of an `analyze` folder, from its tables alone: the histogram of the integrated
 * values by labelled outcome with the threshold, the IQ plane where the records have a Q, the
 * assignment matrix, example records, and the records' noise spectrum. There is no model behind
 * the records, so there is no budget and no noise-free line: the histogram's lines are Gaussians
 * of each outcome's fitted clean centre and spread (the ones its SNR uses).
 */
import { extent, envelope, histogramCounts } from '../../analysis/plot-data.ts';
import { classifierNamed, DEFAULT_CLASSIFIER } from '../../classify/registry.ts';
import type { AnalysisManifest } from '../../io/manifest.ts';
import { openAnalysisFolder } from '../run-folder.ts';
import { displayUnit, probability, short, showValue, withUnit } from '../../io/report/display.ts';
import { noiseSpectrumView } from '../../io/report/noise-view.ts';
import { renderPage, type BuiltReport, type Card, type Figure, type SectionView } from '../../io/report/page.ts';
import { histogramSpec, rawTracesSpec, type TracePlot } from '../../io/report/plots.ts';
import { HISTOGRAM_BINS, iqView } from '../../io/report/point-views.ts';
import { readAnalysisSummary, readAnalysisValues, readExampleRecords, type AnalysisSummary } from '../../io/report/read-analysis.ts';
import { renderPlot, type PlotSpec } from '../../io/report/svg.ts';
import { assignmentTable } from '../../io/report/tables.ts';
import { stateColour } from '../../io/report/theme.ts';

/** The outcome names of the analysis (from its pipeline file, else the summary's columns, else 0/1). */
function outcomesOf(pipeline: Record<string, unknown>, summary: AnalysisSummary | null): [string, string] {
  if (Array.isArray(pipeline.outcomes) && pipeline.outcomes.length === 2) return pipeline.outcomes.map(String) as [string, string];
  const names = summary ? Object.keys(summary).filter((k) => k.startsWith('value_mean_')).map((k) => k.slice('value_mean_'.length)) : [];
  return names.length === 2 ? (names as [string, string]) : ['0', '1'];
}

const num = (row: AnalysisSummary | null, key: string): number => {
  const v = row?.[key];
  return typeof v === 'number' ? v : NaN;
};

/** Gaussian expected counts of `n` values of centre μ and spread σ in bins of `width`, on `xs`. */
function gaussianCounts(n: number, mu: number, sigma: number, width: number, xs: Float64Array): Float64Array {
  const out = new Float64Array(xs.length);
  if (!(sigma > 0) || !Number.isFinite(mu)) return out;
  for (let j = 0; j < xs.length; j++) {
    const z = (xs[j]! - mu) / sigma;
    out[j] = (n * width * Math.exp(-0.5 * z * z)) / (sigma * Math.sqrt(2 * Math.PI));
  }
  return out;
}

/** Builds the report page of an analysis folder. */
export async function buildAnalysisReport(dir: string, manifest: AnalysisManifest, verify = true): Promise<BuiltReport> {
  // every table is checked against run.json first (a damaged or edited folder is one line)
  if (verify) await openAnalysisFolder(dir, manifest);
  const pipelineDoc = JSON.parse(manifest.analysis.pipeline) as Record<string, unknown>;
  const summary = readAnalysisSummary(dir);
  const outcomes = outcomesOf(pipelineDoc, summary);
  const values = await readAnalysisValues(dir, outcomes);
  const unit = values.unit;
  const classifier = classifierNamed(String(pipelineDoc.classifier ?? DEFAULT_CLASSIFIER));
  const threshold = num(summary, 'threshold');
  const axisAngle = num(summary, 'axis_angle');
  const pending: { section: SectionView; figure: Omit<Figure, 'svg'>; spec: PlotSpec }[] = [];
  const sections: SectionView[] = [];

  // integrated values
  const valuesSection: SectionView = { id: 'values', title: 'Integrated values', intro: [], figures: [], tables: [] };
  const groups = summary ? values.labelled : [values.unlabelled];
  const names = summary ? outcomes.map((o) => `labelled ${o}`) : ['records (unlabelled)'];
  const [lo0, hi0] = extent(groups.map((g) => g.value));
  if (Number.isFinite(lo0) && hi0 > lo0) {
    const pad = 0.03 * (hi0 - lo0), lo = lo0 - pad, hi = hi0 + pad;
    const width = (hi - lo) / HISTOGRAM_BINS;
    const shown = displayUnit(unit, Math.max(Math.abs(lo), Math.abs(hi)));
    const xs = Float64Array.from({ length: 4 * HISTOGRAM_BINS + 1 }, (_, i) => lo + (i * (hi - lo)) / (4 * HISTOGRAM_BINS));
    let yMax = 1;
    const states = groups.map((g, k) => {
      const counts = histogramCounts(g.value, lo, hi, HISTOGRAM_BINS);
      counts.forEach((x) => { yMax = Math.max(yMax, x); });
      const curve = summary ? gaussianCounts(g.value.length, num(summary, `value_mean_${outcomes[k]}`), num(summary, `value_sigma_${outcomes[k]}`), width, xs) : new Float64Array(0);
      return {
        name: names[k]!, colour: stateColour(k),
        bars: Array.from(counts, (count, b) => ({ x0: (lo + b * width) * shown.factor, x1: (lo + (b + 1) * width) * shown.factor, count })),
        curve: Array.from(curve, (expected, j) => ({ x: xs[j]! * shown.factor, expected })),
      };
    }).filter((_, k) => groups[k]!.value.length > 0);
    const hasThreshold = Number.isFinite(threshold) && classifier.signalUnitStatistic;
    pending.push({
      section: valuesSection,
      spec: histogramSpec({
        xTitle: withUnit('integrated value along the separation axis', shown), states, binWidth: showValue(width, unit),
        threshold: (hasThreshold ? threshold : NaN) * shown.factor, thresholdText: hasThreshold ? showValue(threshold, unit) : '—',
        domain: [lo * shown.factor, hi * shown.factor], yMax: yMax * 3, groupTitle: 'records',
      }),
      figure: {
        title: summary ? 'Histogram by labelled outcome, with the threshold' : 'Histogram of the records\' integrated values',
        caption: `Bars: the ${groups.reduce((a, g) => a + g.value.length, 0)} ${summary ? 'labelled records that did not calibrate' : 'records'}, pipeline "${values.pipeline}"${values.calibrationRows > 0 ? ` (the ${values.calibrationRows} calibration rows are left out)` : ''}.${summary ? ' Lines: a Gaussian of each outcome\'s clean centre and spread, fitted with a ramp for the records that changed state — the centre and σ its SNR uses; where the bars leave the line are the records that changed state, the mislabelled ones, or non-Gaussian noise.' : ''}${hasThreshold ? ` Dashed: the threshold (${showValue(threshold, unit)}).` : ''}`,
      },
    });
  } else valuesSection.note = 'No decided records to draw.';
  const hasQ = [...values.labelled, values.unlabelled].some((g) => g.quadrature.some((q) => q !== 0));
  if (hasQ) {
    const iq = iqView({ scenario: { states: names.map((name) => ({ name })), signal: { unit } }, groupTitle: 'records' },
      { pipeline: 0, axisAngle: Number.isFinite(axisAngle) ? axisAngle : 0, threshold, sigma: num(summary, 'sigma') },
      groups.map((g) => ({ inPhase: g.inPhase, quadrature: g.quadrature })), !classifier.readsBins && classifier.signalUnitStatistic && Number.isFinite(threshold));
    if (iq) {
      pending.push({
        section: valuesSection, spec: iq.spec,
        figure: { title: 'IQ plane: integrated values, with the decision line', caption: `Points: the integrated I and Q of ${iq.shown} of the ${iq.total} records${iq.shown < iq.total ? ', every k-th record of each group' : ''}.` },
      });
    }
  }
  if (summary) {
    const matrix = outcomes.map((o) => outcomes.map((r) => num(summary, `${o}_reported_${r}`)));
    valuesSection.tables.push({ caption: 'Assignment matrix: each labelled outcome\'s scored records by reported outcome.', table: { ...assignmentTable(outcomes.map((o) => `labelled ${o}`), outcomes, [0, 1], matrix), header: ['labelled', 'correct outcome', ...outcomes.map((o) => `reported "${o}"`)] } });
  }
  sections.push(valuesSection);

  // example records
  const examples = readExampleRecords(dir);
  const recordsSection: SectionView = { id: 'records', title: 'Example records', intro: [], figures: [], tables: [] };
  if (examples && examples.records.length > 0) {
    const n = examples.records[0]!.samples.length / examples.channels;
    const time = displayUnit('s', n / examples.sampleRate);
    const size = Math.max(...examples.records.map((r) => r.samples.reduce((m, x) => Math.max(m, Math.abs(x)), 0)));
    const signal = displayUnit(examples.unit, size);
    const at = (k: number) => (k / examples.sampleRate) * time.factor;
    const plot: TracePlot = {
      timeTitle: withUnit('time from the record start', time), rawTitle: signal.label || 'signal', demodTitle: '',
      window: [examples.window[0] * time.factor, examples.window[1] * time.factor], threshold: NaN,
      shots: examples.records.flatMap((r) => Array.from({ length: examples.channels }, (_, c) => {
        const e = envelope(r.samples, c * n, (c + 1) * n, 700);
        const label = outcomes.indexOf(r.label ?? '');
        return {
          label: `row ${r.shot}${r.label !== null ? `, labelled ${r.label}` : ''}${examples.channels > 1 ? `, ${c === 0 ? 'I' : 'Q'} channel` : ''}`,
          colour: stateColour(Math.max(0, label)),
          raw: e.index.map((k, j) => ({ t: at(k - c * n), v: e.value[j]! * signal.factor })), clean: [], zoomRaw: [], zoomClean: [], demod: [], value: NaN,
        };
      })),
    };
    recordsSection.intro.push(`The first records of each labelled outcome as recorded${examples.records.length > 0 ? '' : ''}; shaded: the records\' window. A record longer than 1400 samples is drawn by the lowest and highest sample of each of 700 columns.`);
    pending.push({ section: recordsSection, spec: rawTracesSpec(plot), figure: { title: 'Records', caption: 'Each record as stored (times the scale), noise and carrier included.' } });
  } else recordsSection.note = 'This analysis kept no example records.';
  sections.push(recordsSection);

  // noise spectrum
  const noise = noiseSpectrumView(dir, manifest.files.includes('noise.arrow'), 'One-sided power spectral density of the records less the mean record of their labelled outcome (Welch\'s method, Hann window, averaged over up to 256 records of each outcome and over I and Q): the noise, and the state changes of the records that changed state (low-frequency excess).');
  const spectrum: SectionView = { id: 'spectrum', title: 'Noise spectrum of the records', intro: [], figures: [], tables: [] };
  if ('note' in noise) spectrum.note = 'The records are too short (under 8 samples) for a spectrum.';
  else pending.push({ section: spectrum, spec: noise.spec, figure: { title: 'Noise spectrum', caption: noise.caption } });
  sections.push(spectrum);

  const warnings: string[] = [];
  let plots = 0;
  for (const p of pending) {
    plots++;
    const r = await renderPlot(p.spec, `plot${plots}-`);
    warnings.push(...r.warnings);
    p.section.figures.push({ ...p.figure, svg: r.svg });
  }

  const cards: Card[] = [];
  const verdict: string[] = [];
  if (summary) {
    const interval = `95 % interval [${probability(num(summary, 'mean_error_low'))}, ${probability(num(summary, 'mean_error_high'))}]`;
    cards.push({ label: 'Mean assignment error', value: probability(num(summary, 'mean_error')), detail: [interval, `${num(summary, 'shots')} labelled records scored`, ...outcomes.map((o) => `labelled ${o}: ${probability(num(summary, `error_${o}`))}`)] });
    cards.push({ label: 'Visibility 1 − P(0|1) − P(1|0)', value: short(num(summary, 'visibility'), 4), detail: [`95 % interval [${short(num(summary, 'visibility_low'), 4)}, ${short(num(summary, 'visibility_high'), 4)}]`] });
    cards.push({ label: 'SNR', value: short(num(summary, 'snr'), 3), detail: [`σ ${showValue(num(summary, 'sigma'), unit)}`, 'separation of the fitted clean centres over their pooled σ'] });
    verdict.push(`Measured against the labels on ${num(summary, 'shots')} records that did not calibrate${values.calibrationRows > 0 ? ` (${values.calibrationRows} calibration rows left out)` : ''}.`);
  } else verdict.push('The records had no labels: every record is decided (shots.arrow), but no error can be scored. Give --labels to score them.');
  const discard = num(summary, 'discard_fraction');
  const postSelection = discard > 0
    ? `This analysis post-selects: ${(100 * discard).toPrecision(3)} % of the scored records fell inside the ambiguous band.`
    : 'This analysis uses no post-selection: every scored record is counted.';
  const html = renderPage({
    kind: 'analysis',
    name: `Analysis of ${manifest.analysis.records}`,
    description: `Pipeline "${values.pipeline}" (${classifier.name} classifier) on recorded traces${manifest.analysis.labels ? `, scored against ${manifest.analysis.labels}` : ''}.`,
    summaryLine: `${values.labelled.reduce((a, g) => a + g.value.length, 0) + values.unlabelled.value.length + values.calibrationRows} records`,
    facts: [
      ['records', manifest.analysis.records], ['labels', manifest.analysis.labels ?? 'none'], ['pipeline', values.pipeline],
      ['tool version', manifest.version],
    ],
    postSelection, cards, verdict, sections,
    scenarioJson: JSON.stringify(pipelineDoc, null, 2),
  });
  return { html, warnings, plots };
}
