/**
 * The fit report: one self-contained page beside the fitted scenario, showing the records
 * against the model — the histogram of each record's window mean beside the model's
 * distribution of it, and the measured noise spectrum with the fitted components and what is
 * left (measured ÷ fitted) — the table of estimates with their uncertainties, how each part
 * was decided, and the scenario text. Plots are vega-lite specs rendered to inline SVG
 * (svg.ts); nothing is loaded from anywhere.
 */
import { extent, histogramCounts } from '../../analysis/plot-data.ts';
import { mixtureDensity } from '../../analysis/value-density.ts';
import type { Estimate } from '../../fit/estimate.ts';
import type { FittedReadout } from '../../fit/fitted-readout.ts';
import { componentDensities } from '../../fit/spectrum-model.ts';
import { expectedDensity } from '../../fit/noise-model.ts';
import type { TwinDocument } from '../scenario-yaml.ts';
import { displayUnit, short, showValue, withUnit } from './display.ts';
import { renderDocumentPage, type Figure, type SectionView, type TableView } from './page.ts';
import { histogramSpec, spectrumSpec } from './plots.ts';
import { renderPlot, type PlotSpec } from './svg.ts';
import { stateColour } from './theme.ts';

const HISTOGRAM_BINS = 80;

function histogramFigure(f: FittedReadout, unit: string): PlotSpec | null {
  const v = f.view;
  const [lo0, hi0] = extent(v.groups.map((g) => g.values));
  if (!(hi0 > lo0)) return null;
  const pad = 0.04 * (hi0 - lo0), lo = lo0 - pad, hi = hi0 + pad, width = (hi - lo) / HISTOGRAM_BINS;
  const d = displayUnit(unit, Math.max(Math.abs(lo), Math.abs(hi)));
  const xs = Float64Array.from({ length: 4 * HISTOGRAM_BINS + 1 }, (_, i) => lo + (i * (hi - lo)) / (4 * HISTOGRAM_BINS));
  let yMax = 1;
  const states = v.groups.map((g, i) => {
    const counts = histogramCounts(g.values, lo, hi, HISTOGRAM_BINS);
    counts.forEach((c) => { yMax = Math.max(yMax, c); });
    const density = mixtureDensity(g.mixture, v.sigma, xs, new Float64Array(xs.length));
    return {
      name: g.name, colour: stateColour(i),
      bars: Array.from(counts, (count, b) => ({ x0: (lo + b * width) * d.factor, x1: (lo + (b + 1) * width) * d.factor, count })),
      curve: Array.from(xs, (x, j) => ({ x: x * d.factor, expected: g.values.length * width * density[j]! })),
    };
  });
  const midpoint = 0.5 * (v.levels[0] + v.levels[1]);
  return histogramSpec({
    xTitle: withUnit('window mean along the separation', d), states, threshold: midpoint * d.factor,
    binWidth: showValue(width, unit), thresholdText: `${showValue(midpoint, unit)} (midpoint)`,
    domain: [lo * d.factor, hi * d.factor], yMax: yMax * 3, groupTitle: 'records',
  });
}

function spectrumFigures(f: FittedReadout, unit: string): { spectrum: PlotSpec; residual: PlotSpec } {
  const fit = f.noise.fit, p = fit.chosen.parameters;
  const s = fit.spectrum;
  let top = 0;
  for (let k = 2; k < s.density.length; k++) top = Math.max(top, Math.sqrt(s.density[k]!));
  const d = displayUnit(unit ? `${unit}/rtHz` : '', top);
  const amplitude = (psd: number) => Math.sqrt(psd) * d.factor;
  const components: { name: string; f: number; psd: number }[] = [];
  const residual: { name: string; f: number; psd: number }[] = [];
  for (let k = 2; k < s.density.length - 1; k++) {
    const freq = s.frequencies[k]!;
    components.push({ name: 'measured', f: freq, psd: amplitude(s.density[k]!) });
    const expected = expectedDensity(fit.chosen, s, fit.frame, k);
    components.push({ name: 'fitted, as the window sees it', f: freq, psd: amplitude(expected) });
    const [w, a, b] = componentDensities(p, fit.frame, freq);
    components.push({ name: 'white', f: freq, psd: amplitude(w) });
    if (p.flicker) components.push({ name: '1/f', f: freq, psd: amplitude(a) });
    if (p.lorentzian) components.push({ name: 'correlated (Lorentzian)', f: freq, psd: amplitude(b) });
    if (fit.mask[k]) residual.push({ name: 'measured ÷ fitted (bins used in the fit)', f: freq, psd: s.density[k]! / expected });
  }
  const where = f.noise.domain === 'pair' ? 'along the separation of the I/Q pairs' : 'of the records';
  return {
    spectrum: spectrumSpec({ yTitle: withUnit(`amplitude density ${where}, log scale`, d), components }),
    residual: spectrumSpec({ yTitle: 'measured ÷ fitted (log scale)', components: residual }),
  };
}

const pm = (e: Estimate, unit: string) => (Number.isFinite(e.standardError) && e.standardError > 0 ? `± ${showValue(e.standardError, unit)}` : '—');

function estimatesTable(f: FittedReadout, unit: string): TableView {
  const rows: string[][] = [];
  const density = unit ? `${unit}/rtHz` : '';
  for (const s of f.states) {
    rows.push([`level of ${s.name} (outcome ${s.outcome}), real part`, showValue(s.re.value, unit), pm(s.re, unit), 'posterior-weighted mean of the bins away from jumps']);
    if (f.carrier.shape !== 'none') rows.push([`level of ${s.name}, imaginary part`, showValue(s.im.value, unit), pm(s.im, unit), 'the same, turned so that the separation is real']);
    rows.push([`prepared share of ${s.name}`, short(s.share.value), `± ${short(s.share.standardError, 2)}`, f.preparation ? 'the labels' : 'the model\'s start probabilities']);
  }
  if (f.carrier.shape !== 'none') {
    rows.push(['carrier frequency', showValue(f.carrier.frequency.value, 'Hz'), pm(f.carrier.frequency, 'Hz'), f.carrier.origin === 'found' ? 'strongest line, least squares' : f.carrier.origin]);
    rows.push(['carrier phase', showValue(f.carrier.phase.value, 'rad'), pm(f.carrier.phase, 'rad'), 'the separation of the levels']);
  }
  for (const t of f.transitions) {
    rows.push([`${t.kind}: ${f.states[t.from]!.name} → ${f.states[t.to]!.name}`, t.kept ? showValue(t.lifetime.value, 's') : 'none',
      t.kept ? pm(t.lifetime, 's') : '—', `likelihood ratio ${short(t.deviance, 3)} (kept above 10.83)`]);
  }
  for (const p of f.preparation ?? []) {
    rows.push([`preparation error of ${f.states[p.state]!.name} (labelled ${p.labelName})`, short(p.probability, 3), `95 % [${short(p.low, 2)}, ${short(p.high, 2)}]`, `${p.startedElsewhere} of ${p.records} started at the other level`]);
  }
  const n = f.noise;
  rows.push(['white noise density', showValue(n.white.value, density), pm(n.white, density), 'Whittle fit of the Welch spectrum']);
  rows.push([`1/f density at ${showValue(n.flicker.at, 'Hz')}`, n.flicker.test.kept ? showValue(n.flicker.density.value, density) : 'none', n.flicker.test.kept ? pm(n.flicker.density, density) : '—',
    `likelihood ratio ${short(n.flicker.test.deviance, 3)}, share ${short(100 * n.flicker.test.share, 2)} %`]);
  if (n.flicker.test.kept) rows.push(['1/f exponent', short(n.flicker.exponent.value), `± ${short(n.flicker.exponent.standardError, 2)}`, '']);
  rows.push(['correlated noise density', n.correlated.test.kept ? showValue(n.correlated.density.value, density) : 'none', n.correlated.test.kept ? pm(n.correlated.density, density) : '—',
    `likelihood ratio ${short(n.correlated.test.deviance, 3)}, share ${short(100 * n.correlated.test.share, 2)} %`]);
  if (n.correlated.test.kept) rows.push(['correlation time', showValue(n.correlated.correlationTime.value, 's'), pm(n.correlated.correlationTime, 's'), '']);
  return { header: ['quantity', 'how', 'estimate', 'uncertainty'], rows: rows.map(([q, v, u, h]) => [q!, h!, v!, u!]), textColumns: 2 };
}

/** The report page of a fit (see the file comment), and what the plotting library said while drawing it (a clean page: nothing). */
export async function fitReportHtml(doc: TwinDocument, yaml: string): Promise<{ html: string; warnings: string[] }> {
  const f = doc.fitted, unit = doc.unit;
  const warnings: string[] = [];
  const rendered = async (spec: PlotSpec, id: string) => {
    const plot = await renderPlot(spec, id);
    warnings.push(...plot.warnings);
    return plot.svg;
  };
  const histogram = histogramFigure(f, unit);
  const spectra = spectrumFigures(f, unit);
  const figures: Figure[] = [];
  if (histogram) {
    figures.push({
      title: 'Window means: the records against the model', svg: await rendered(histogram, 'h'),
      caption: `Bars: each record's mean over the window (${showValue(f.window.start, 's')} + ${showValue(f.window.length, 's')}), along the separation. Curves: what the fitted model predicts — levels, relaxation in the window, preparation errors, prepared shares — with σ = ${showValue(f.view.sigma, unit)} from the fitted noise spectrum. The dashed line is the midpoint of the levels.`,
    });
  }
  const fit = f.noise.fit;
  const sections: SectionView[] = [
    { id: 'estimates', title: 'What the records say', intro: [], figures: [], tables: [{ caption: '± one standard error (bootstrap over groups of records) or a 95 % Wilson interval', table: estimatesTable(f, unit) }] },
    { id: 'window', title: 'Window means', intro: [], figures, tables: [], ...(histogram ? {} : { note: 'The window means do not spread: nothing to draw.' }) },
    {
      id: 'spectrum', title: 'Noise spectrum', intro: [
        `Welch's method over ${short(fit.segments, 6)} segments of ${fit.segmentLength} samples, from the stretches of records inside the window that stay at one level, with that level taken away${f.noise.domain === 'pair' ? ', projected on the separation of the I/Q pairs' : ''}. Fitted by maximum likelihood on the periodogram (Whittle), the model seen through the window.`,
        fit.lines.length ? `Left out as lines: ${fit.lines.map((x) => showValue(x, 'Hz')).join(', ')}.` : 'No line was left out.',
      ],
      figures: [
        { title: 'Measured spectrum and the fitted components', svg: await rendered(spectra.spectrum, 's'), caption: 'Amplitude density √S. A component the records do not support is not drawn.' },
        { title: 'What is left', svg: await rendered(spectra.residual, 'r'), caption: 'Measured ÷ fitted in each bin used: scattered about 1 by ±1/√ν when the model holds.' },
      ],
      tables: [],
    },
    {
      id: 'how', title: 'How it was fitted', figures: [], tables: [], intro: [
        `Each record's envelope in ${f.details.bins} bins of ${f.details.binSamples} samples; a two-level hidden-Markov model learned by Baum–Welch (${f.details.iterations} iterations), two levels beating one by a likelihood ratio of ${short(f.details.levelDeviance, 3)}.`,
        'A rate is kept when the model without it loses more than 10.83 in likelihood ratio (χ² with one degree of freedom at 99.9 %); a noise component when dropping it loses more than 13.82 (two degrees of freedom) and it makes up at least 10 % of the spectrum somewhere in the band.',
        `Uncertainties: a bootstrap over ${f.details.groups} groups of consecutive records, ${f.details.resamples} resamples, seed ${f.details.seed}.`,
      ],
    },
  ];
  const facts: [string, string][] = [
    ['records', `${f.used} of ${f.rows}`], ['samples', `${f.samples}${f.complex ? ' I/Q pairs' : ''}`], ['sample rate', showValue(f.sampleRate, 'Hz')],
    ['carrier', f.carrier.shape === 'none' ? 'none' : `${f.carrier.shape}, ${showValue(f.carrier.frequency.value, 'Hz')}`], ['file dated', doc.fileDate ?? 'unknown'],
  ];
  const html = renderDocumentPage({
    kicker: 'singleshot · a twin fitted to recorded traces', name: `Fit of ${doc.records}`,
    description: doc.labels ? `With the labels ${doc.labels}.` : 'Without labels.', facts, sections,
    footerNote: 'The fitted scenario, as written beside this page:', footerText: yaml,
  });
  return { html, warnings };
}
