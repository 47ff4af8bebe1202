/**
 * The fitted twin as a scenario file: YAML that `singleshot run` accepts as it is, every number
 * with its unit, and beside each estimate, as a comment, its uncertainty and how it was found.
 * The header names the records and the date of their file. Bytes only: the numbers and the
 * decisions come from src/fit.
 */
import { basename } from 'node:path';
import type { Estimate } from '../fit/estimate.ts';
import type { FittedReadout } from '../fit/fitted-readout.ts';
import { formatQuantity } from '../scenario/units.ts';

/** Where a setting of the fit came from, for the comments. */
export type SettingSource = 'option' | 'file' | 'found' | 'assumed' | 'absent';

/** What the file is made from. */
export interface TwinDocument {
  fitted: FittedReadout;
  /** The signal unit: 'A', 'V' or '' (plain numbers). */
  unit: string;
  /** The records as named on the command line. */
  records: string;
  /** The labels as named, or null. */
  labels: string | null;
  /** Last modification of the records' file (YYYY-MM-DD), or null. */
  fileDate: string | null;
  version: string;
  sources: { sampleRate: SettingSource; carrier: SettingSource; window: SettingSource; unit: SettingSource };
}

const DIGITS = 5;
/** Timing keeps more digits: the twin's record must hold exactly the records' samples. */
const TIMING_DIGITS = 9;

/** A value in `unit` ('' for a plain number) as the scenario reads it. */
function quantity(value: number, unit: string, digits = DIGITS): string {
  return formatQuantity(value, unit, digits);
}

const PREFIXES: [number, string][] = [[1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f']];

/** "± 0.12 pA": the error in two digits, with the prefix of the value it belongs to; "" when there is none. */
function plusMinus(e: Estimate, unit: string): string {
  if (!(Number.isFinite(e.standardError) && e.standardError > 0)) return '';
  if (!unit || unit === 'deg') return `± ${formatQuantity(e.standardError, unit, 2)}`;
  const size = Math.abs(e.value) > 0 && Number.isFinite(e.value) ? Math.abs(e.value) : e.standardError;
  const [scale, prefix] = PREFIXES.find(([p]) => size >= p) ?? PREFIXES[PREFIXES.length - 1]!;
  return `± ${Number((e.standardError / scale).toPrecision(2))} ${prefix}${unit}`;
}

function pad(line: string, comment: string): string {
  if (!comment) return line;
  return `${line.padEnd(Math.max(line.length + 2, 52))}# ${comment}`;
}

const FROM: Record<SettingSource, string> = {
  option: 'given on the command line', file: 'from the file\'s attributes', found: 'found in the records', assumed: 'assumed (not given)', absent: 'not given',
};

/** The scenario text (see the file comment). */
export function twinScenarioYaml(d: TwinDocument): string {
  const f = d.fitted, u = d.unit, density = u ? `${u}/rtHz` : '';
  const lines: string[] = [];
  const name = basename(d.records);
  lines.push(
    `# A twin of recorded readout traces, fitted by singleshot fit ${d.version}.`,
    `# Records: ${d.records} (${f.used === f.rows ? `all ${f.rows}` : `the first ${f.used} of ${f.rows}`} records of ${f.samples} ${f.complex ? 'I/Q pairs' : 'samples'})${d.labels ? `, labels: ${d.labels}` : ', no labels'}.`,
    `# The records' file is dated ${d.fileDate ?? 'unknown'}.`,
    `# Beside each estimate: ± one standard error (bootstrap over ${f.details.groups} groups of records,`,
    `# ${f.details.resamples} resamples, seed ${f.details.seed}), or a 95 % Wilson interval; the fit report beside this`,
    '# file shows the data against the model.',
    `name: ${JSON.stringify(`Twin of ${name}`)}`,
    `description: ${JSON.stringify(`Fitted by singleshot fit from ${f.used} recorded records of ${name}.`)}`,
    'seed: 1',
    pad('shots: 100000', 'choose your own'),
    'calibrationShots: 20000',
    '',
    'timing:',
    pad(`  sampleRate: ${quantity(f.sampleRate, 'Hz', TIMING_DIGITS)}`, FROM[d.sources.sampleRate]),
    pad(`  recordLength: ${quantity(f.samples / f.sampleRate, 's', TIMING_DIGITS)}`, `${f.samples} samples`),
    pad(`  window: { start: ${quantity(f.window.start, 's', TIMING_DIGITS)}, length: ${quantity(f.window.length, 's', TIMING_DIGITS)} }`,
      d.sources.window === 'absent' ? 'not given: the whole record' : FROM[d.sources.window]),
    '',
    'states:',
  );
  const stateName = (t: number) => f.states[t]!.name;
  // an imaginary part within two standard errors of zero is left out (it is common to both levels
  // once the separation is real, and a common offset across the separation changes no error)
  const complex = f.states.some((s) => Math.abs(s.im.value) > 2 * (Number.isFinite(s.im.standardError) ? s.im.standardError : 0));
  for (const s of f.states) {
    const level = complex
      ? `{ re: ${quantity(s.re.value, u)}, im: ${quantity(s.im.value, u)} }`
      : quantity(s.re.value, u);
    const error = complex ? [plusMinus(s.re, u), plusMinus(s.im, u)].filter(Boolean).join(', ') : plusMinus(s.re, u);
    lines.push(`  - name: ${s.name}`, pad(`    level: ${level}`, error), `    outcome: ${JSON.stringify(s.outcome)}`);
  }
  if (complex) {
    lines.push('  # levels turned so that their separation lies along the real axis: a phase common to both is a');
    lines.push('  # carrier phase no record can tell');
  }
  lines.push('', pad(`prepare: { ${f.states.map((s) => `${s.name}: ${Number(s.share.value.toPrecision(DIGITS))}`).join(', ')} }`,
    `${f.preparation ? 'shares of the labels' : 'the model\'s start probabilities'}, ± ${Number(f.states[0].share.standardError.toPrecision(2))}`));

  // preparation errors
  if (f.preparation) {
    const kept = f.preparation.filter((p) => p.probability > 0);
    if (kept.length) lines.push('', 'preparationError:');
    for (const p of f.preparation) {
      const why = `${p.startedElsewhere} of ${p.records} records labelled ${JSON.stringify(p.labelName)} started at the other level`;
      if (p.probability > 0) {
        lines.push(pad(`  ${stateName(p.state)}: { probability: ${Number(p.probability.toPrecision(DIGITS))}, into: ${stateName(1 - p.state)} }`,
          `95 % Wilson [${Number(p.low.toPrecision(2))}, ${Number(p.high.toPrecision(2))}]: ${why}`));
      } else {
        lines.push(`# no preparation error for ${stateName(p.state)}: ${why} (95 % Wilson up to ${Number(p.high.toPrecision(2))})`);
      }
    }
  }

  // transitions
  const kept = f.transitions.filter((t) => t.kept);
  lines.push('');
  if (kept.length) lines.push('transitions:');
  for (const t of f.transitions) {
    const pair = `${stateName(t.from)} → ${stateName(t.to)}`;
    if (t.kept) {
      lines.push(pad(`  - { from: ${stateName(t.from)}, to: ${stateName(t.to)}, lifetime: ${quantity(t.lifetime.value, 's')}, kind: ${t.kind} }`,
        `${plusMinus(t.lifetime, 's')}; dropping it costs likelihood ratio ${Number(t.deviance.toPrecision(3))} > 10.83`));
    } else {
      lines.push(`# ${pair}: no transition — the records do not support one (likelihood ratio ${Number(t.deviance.toPrecision(3))} ≤ 10.83)`);
    }
  }

  // the signal
  lines.push('', 'signal:', `  unit: ${u || 'none'}`);
  const c = f.carrier;
  if (c.shape === 'none') {
    lines.push(pad('  carrier: none', d.sources.carrier === 'found' || d.sources.carrier === 'absent' ? 'no carrier line in the records' : FROM[d.sources.carrier]));
  } else {
    const how = c.origin === 'found'
      ? `found in the records (a line ${Number(c.lineRatio.toPrecision(2))}× its neighbours, refined by least squares): ${plusMinus(c.frequency, 'Hz')}; phase ${plusMinus({ value: 0, standardError: (c.phase.standardError * 180) / Math.PI }, 'deg')}`
      : c.origin === 'assumed'
        ? 'not given: the I/Q pairs do not say their carrier, so a quarter of the sample rate is assumed'
        : FROM[d.sources.carrier];
    lines.push(pad(`  carrier: { shape: ${c.shape}, frequency: ${quantity(c.frequency.value, 'Hz', TIMING_DIGITS)}, phase: ${quantity((c.phase.value * 180) / Math.PI, 'deg')} }`, how));
  }
  const n = f.noise;
  lines.push('  noise:');
  if (n.domain === 'pair') {
    lines.push('    # measured along the separation of the I/Q pairs, read as the demodulation 2·x·e^(−iθ): a record\'s');
    lines.push('    # white density S shows as 2S there; slow noise along the separation acts like a level change, so');
    lines.push('    # it enters the twin at the sensor');
  }
  lines.push(pad(`    white: { density: ${quantity(n.white.value, density)} }`, plusMinus(n.white, density)));
  const fl = n.flicker;
  if (fl.test.kept) {
    lines.push(`    # 1/f: ${plusMinus(fl.density, density)} at ${quantity(fl.at, 'Hz')}, exponent ± ${Number(fl.exponent.standardError.toPrecision(2))};`
      + ` likelihood ratio ${Number(fl.test.deviance.toPrecision(3))} > 13.82, up to ${Math.round(100 * fl.test.share)} % of the spectrum;`
      + ` below ${quantity(fl.low, 'Hz')} the records cannot tell`);
    lines.push(`    flicker: { density: ${quantity(fl.density.value, density)}, at: ${quantity(fl.at, 'Hz')}, exponent: ${Number(fl.exponent.value.toPrecision(DIGITS))}, low: ${quantity(fl.low, 'Hz')}, high: ${quantity(fl.high, 'Hz')}, injection: ${n.injection} }`);
  } else {
    lines.push(`    # no 1/f noise: the records do not support it (likelihood ratio ${Number(fl.test.deviance.toPrecision(3))}, at most ${Math.round(100 * fl.test.share)} % of the spectrum)`);
  }
  const co = n.correlated;
  if (co.test.kept) {
    lines.push(`    # correlated: ${plusMinus(co.density, density)}, correlation time ${plusMinus(co.correlationTime, 's')};`
      + ` likelihood ratio ${Number(co.test.deviance.toPrecision(3))} > 13.82, up to ${Math.round(100 * co.test.share)} % of the spectrum`);
    lines.push(`    correlated: { density: ${quantity(co.density.value, density)}, correlationTime: ${quantity(co.correlationTime.value, 's')}, injection: ${n.injection} }`);
  } else {
    lines.push(`    # no correlated (Lorentzian) noise: the records do not support it (likelihood ratio ${Number(co.test.deviance.toPrecision(3))}, at most ${Math.round(100 * co.test.share)} % of the spectrum)`);
  }
  lines.push('', 'processing:', '  referencePhase: auto', '  threshold: optimal', '');
  return lines.join('\n');
}
