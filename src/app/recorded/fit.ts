/**
 * `singleshot fit RECORDS --out twin.yaml` as a library function: read recorded traces (any
 * format src/io/records reads) and their labels, decide each setting — the option, else the
 * file's attribute, else found in the records or left as the whole record, and say which — fit
 * the twin (src/fit), write it as a commented scenario that `run` accepts (io/scenario-yaml.ts,
 * checked here by the scenario parser before it is written) and the fit report beside it.
 */
import { existsSync, statSync } from 'node:fs';
import { dirname, extname } from 'node:path';
import { InputError } from '../../errors.ts';
import { fitRecords, type FitSettings } from '../../fit/fit-records.ts';
import { DEFAULT_BOOTSTRAP_SEED, DEFAULT_RESAMPLES } from '../../fit/estimate.ts';
import type { FittedReadout } from '../../fit/fitted-readout.ts';
import { writeFileAtomic } from '../../io/atomic-file.ts';
import { TOOL_VERSION } from '../../io/metadata.ts';
import { locateRecords, openLabels, openRecords } from '../../io/records/open.ts';
import type { RecordSet } from '../../io/records/record-set.ts';
import { fitReportHtml } from '../../io/report/fit-page.ts';
import { twinScenarioYaml, type TwinDocument } from '../../io/scenario-yaml.ts';
import { loadScenarioText } from '../../scenario/load.ts';
import { formatQuantity } from '../../scenario/units.ts';

/** Fewest records the fit takes (the bootstrap needs groups of them). */
export const MIN_RECORDS = 10;

/** What to fit and where to write it; every setting left out is taken from the file, or found, or noted. */
export interface FitOptions {
  /** Records: FILE or FILE:NAME (io/records/open.ts). */
  records: string;
  /** Labels: a column, dataset or array of the records' file, or FILE[:NAME]. */
  labels?: string;
  /** The scenario file to write; the report goes beside it (.html). */
  out: string;
  sampleRate?: number;
  /** Carrier frequency (Hz) or 'none'. */
  carrier?: number | 'none';
  /** Integration window (s from the record start). */
  window?: { start: number; length: number };
  /** Signal units per stored unit. */
  scale?: number;
  /** The records' unit: 'A', 'V' or '' (plain numbers). */
  unit?: string;
  /** Bootstrap resamples (default DEFAULT_RESAMPLES, 30). */
  resamples?: number;
  /** Seed of the bootstrap (default DEFAULT_BOOTSTRAP_SEED, 1). */
  seed?: number;
  /** Write the fit report (default true). */
  report?: boolean;
  /** Replace an existing scenario file. */
  force?: boolean;
}

/** What the fit found, where it wrote it, and what it had to decide on its own. */
export interface FitResult {
  fitted: FittedReadout;
  scenarioPath: string;
  reportPath: string | null;
  /** The settings that were neither given nor in the file, and what was done instead, in plain words. */
  notes: string[];
  /** What the scenario parser says about the twin (warnings, not errors). */
  warnings: string[];
  /** What the plotting library said while drawing the report (a clean report: nothing). */
  reportWarnings: string[];
  yaml: string;
  /** The signal unit of the twin ('' for plain numbers). */
  unit: string;
}

/** The report's path: the scenario's with .html for its extension. */
export function reportPathOf(out: string): string {
  const ext = extname(out);
  return (ext ? out.slice(0, -ext.length) : out) + '.html';
}

function unitOf(text: string | undefined): string | null {
  if (text === undefined) return null;
  return text === 'A' || text === 'V' ? text : text === '' || text === 'none' ? '' : null;
}

/** Decides each setting (see the file comment). */
function settingsOf(o: FitOptions, set: RecordSet, notes: string[]): { settings: Omit<FitSettings, 'labels' | 'seed' | 'resamples'>; sources: TwinDocument['sources']; unit: string } {
  const a = set.attributes;
  const hz = (x: number) => formatQuantity(x, 'Hz');
  const sampleRate = o.sampleRate ?? a.sampleRate;
  if (sampleRate === undefined) {
    throw new InputError(o.records, 'sample rate', 'a sample rate: --sample-rate, or a sample_rate attribute in the file', 'neither');
  }
  if (!(sampleRate > 0 && Number.isFinite(sampleRate))) throw new InputError(o.records, 'sample rate', 'a positive sample rate', String(sampleRate));
  const sources: TwinDocument['sources'] = { sampleRate: o.sampleRate !== undefined ? 'option' : 'file', carrier: 'option', window: 'option', unit: 'option' };
  let carrier: FitSettings['carrier'] = 'find';
  let pairCarrier: number | null = null;
  const given = o.carrier ?? (a.carrierFrequency === undefined ? undefined : a.carrierFrequency === 0 ? 'none' : a.carrierFrequency);
  if (o.carrier === undefined) sources.carrier = given === undefined ? 'absent' : 'file';
  if (given !== undefined && given !== 'none' && !(given > 0 && given < sampleRate / 2)) {
    throw new InputError(o.carrier === undefined ? o.records : '--carrier', 'carrier frequency', `a frequency between 0 and half the sample rate (${hz(sampleRate / 2)})`, hz(given));
  }
  if (set.complex) {
    pairCarrier = given === undefined || given === 'none' ? null : given;
    if (pairCarrier === null) sources.carrier = 'assumed';
  } else if (given === undefined) {
    notes.push('carrier: not given (no --carrier, no carrier_frequency in the file); searched the records for one');
  } else carrier = given;
  const recordLength = set.samples / sampleRate;
  let window = o.window;
  if (window) sources.window = 'option';
  else if (a.windowStart !== undefined && a.windowLength !== undefined) { window = { start: a.windowStart, length: a.windowLength }; sources.window = 'file'; }
  else {
    window = { start: 0, length: recordLength };
    sources.window = 'absent';
    notes.push('window: not given (no --window, no window_start and window_length in the file); the twin integrates the whole record');
  }
  if (!(window.start >= 0 && window.length > 0 && window.start + window.length <= recordLength * (1 + 1e-9))) {
    throw new InputError(o.window ? '--window' : o.records, 'window', `a window inside the ${formatQuantity(recordLength, 's')} record (${set.samples} samples at ${hz(sampleRate)})`,
      `start ${formatQuantity(window.start, 's')}, length ${formatQuantity(window.length, 's')}`);
  }
  let unit = unitOf(o.unit);
  if (o.unit !== undefined && unit === null) throw new InputError('--unit', '', 'A, V or none', JSON.stringify(o.unit));
  if (unit === null) {
    unit = unitOf(a.unit);
    sources.unit = unit === null ? 'absent' : 'file';
    if (unit === null) {
      unit = '';
      notes.push('unit: not given (no --unit, no unit in the file); levels and densities are written as plain numbers');
    }
  }
  return { settings: { sampleRate, carrier, pairCarrier, window }, sources, unit };
}

/** Fits the records and writes the twin (see the file comment). */
export async function fitToScenario(o: FitOptions): Promise<FitResult> {
  if (existsSync(o.out) && !o.force) throw new InputError(o.out, '', 'a scenario file that does not exist yet (or --force to replace it)', 'an existing file');
  const folder = dirname(o.out);
  if (!existsSync(folder) || !statSync(folder).isDirectory()) throw new InputError(o.out, '', 'a path in an existing folder', `no folder ${folder}`);
  const set = await openRecords(o.records, o.scale ?? 1);
  const notes: string[] = [];
  let fitted: FittedReadout, chosen: ReturnType<typeof settingsOf>;
  try {
    if (set.rows < MIN_RECORDS) throw new InputError(set.source, '', `at least ${MIN_RECORDS} records`, `${set.rows}`);
    chosen = settingsOf(o, set, notes);
    let labels: FitSettings['labels'] = null;
    if (o.labels !== undefined) {
      const l = await openLabels(o.labels, o.records, null);
      if (l.values.length !== set.rows) throw new InputError(l.source, '', `one label per record (${set.rows} records in ${set.source})`, `${l.values.length} labels`);
      labels = { values: l.values, names: [l.names[0] ?? '0', l.names[1] ?? '1'] };
    }
    fitted = fitRecords(set, { ...chosen.settings, labels, seed: o.seed ?? DEFAULT_BOOTSTRAP_SEED, resamples: o.resamples ?? DEFAULT_RESAMPLES });
  } finally {
    set.close();
  }
  const hz = (x: number) => formatQuantity(x, 'Hz');
  if (fitted.carrier.shape !== 'none' && fitted.carrier.origin === 'assumed') {
    notes.push(`carrier: the I/Q pairs do not say their carrier (no --carrier, no carrier_frequency in the file); the twin modulates at a quarter of the sample rate, ${hz(fitted.carrier.frequency.value)}`);
  } else if (set.complex && fitted.carrier.shape === 'none') chosen.sources.carrier = 'absent';
  if (fitted.carrier.shape !== 'none' && fitted.carrier.origin === 'found') notes.push(`carrier: found at ${hz(fitted.carrier.frequency.value)} (${fitted.carrier.shape})`);
  else if (chosen.sources.carrier === 'absent') notes.push('carrier: none found (no line in the records\' spectrum); the twin is read at baseband');
  if (fitted.used < fitted.rows) notes.push(`records: the first ${fitted.used} of ${fitted.rows} were used`);
  let fileDate: string | null = null;
  try {
    fileDate = statSync(locateRecords(o.records).path).mtime.toISOString().slice(0, 10);
  } catch { /* the date stays unknown */ }
  const doc: TwinDocument = { fitted, unit: chosen.unit, records: o.records, labels: o.labels ?? null, fileDate, version: TOOL_VERSION, sources: chosen.sources };
  const yaml = twinScenarioYaml(doc);
  let warnings: string[];
  try {
    warnings = loadScenarioText(yaml, o.out).warnings;
  } catch (e) {
    // the twin is ours: a scenario the parser refuses is a bug here, not the user's input
    throw new Error(`the fitted scenario does not parse: ${(e as Error).message}\n${yaml}`);
  }
  writeFileAtomic(o.out, yaml);
  let reportPath: string | null = null, reportWarnings: string[] = [];
  if (o.report !== false) {
    reportPath = reportPathOf(o.out);
    const page = await fitReportHtml(doc, yaml);
    writeFileAtomic(reportPath, page.html);
    reportWarnings = page.warnings;
  }
  return { fitted, scenarioPath: o.out, reportPath, notes, warnings, reportWarnings, yaml, unit: chosen.unit };
}
