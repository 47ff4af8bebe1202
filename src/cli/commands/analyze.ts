/** `singleshot analyze RECORDS --out DIR [--pipeline FILE] [--labels LABELS]`: run a pipeline on a lab's records. */
import { Command } from 'commander';
import type { AnalyzeRecordsResult } from '../../library/analyze.ts';
import { formatQuantity } from '../../scenario/units.ts';
import { formatProbability, rows } from '../format.ts';
import { withRecordOptions, type RecordOptions } from '../quantity-option.ts';

const interval = (x: { rate: number; low: number; high: number }) => `[${formatProbability(x.low)}, ${formatProbability(x.high)}]`;

/** The readable summary of an analysis (`signal`: the classifier's statistic is in the signal's unit). */
export function formatAnalysis(r: AnalyzeRecordsResult, out: string, signal: boolean): string {
  const q = (x: number) => formatQuantity(x, r.unit);
  const lines = [
    `${r.rows} ${r.complex ? 'complex (I and Q) ' : ''}records from ${r.source}, pipeline "${r.pipeline}" (${r.bins} bins a record)`,
    `  calibrated by ${r.calibratedBy}${r.calibrationRows > 0 ? ` (${r.calibrationRows} rows, decided but not scored)` : ''}`,
  ];
  const s = r.summary;
  if (!s) {
    lines.push('  no labels: every record decided (shots.arrow), no error to score (give --labels to score)');
  } else {
    lines.push(`  ${s.shots} labelled records scored; threshold ${signal ? q(s.threshold) : s.threshold.toPrecision(4)}`);
    lines.push(`  SNR (separation/σ of the integrated value, clean centres and σ fitted to the labelled groups): ${s.snr.toFixed(2)}; σ ${q(s.sigma)}`);
    const table: string[][] = [['  labelled', 'records', 'error', '95% interval', ...r.outcomes.map((o) => `reported ${o}`), 'centre', 'spread']];
    s.states.forEach((st, o) => {
      table.push([`  ${st.state}`, String(st.shots), formatProbability(st.error.rate), interval(st.error),
        ...st.assignment.map((a) => formatProbability(a)), q(s.outcomeValues[o]!.mean), q(s.outcomeValues[o]!.sigma)]);
    });
    table.push(['  mean', String(s.shots), formatProbability(s.meanError.rate), interval(s.meanError), ...r.outcomes.map(() => ''), '', '']);
    lines.push(rows(table));
    const v = s.visibility;
    lines.push(`  visibility 1 − P(0|1) − P(1|0): ${v.value.toFixed(4)} [${v.low.toFixed(4)}, ${v.high.toFixed(4)}] (95%)`);
    if (s.banded) {
      lines.push(`  ambiguous band: ${s.discarded} discarded (${formatProbability(s.discardFraction)}); error of the kept ${formatProbability(s.postSelectedError.rate)} ${interval(s.postSelectedError)}, discards as failures ${formatProbability(s.discardsAsFailuresError.rate)} ${interval(s.discardsAsFailuresError)}`);
    }
    lines.push('  (measured on these records: the labels are taken as the truth, so a preparation error counts as a readout error)');
  }
  lines.push(`tables written to ${out}: ${r.files.join(', ')}`);
  return lines.join('\n');
}

/** The --json object of an analysis. */
function analysisJson(r: AnalyzeRecordsResult, out: string): Record<string, unknown> {
  const s = r.summary;
  return {
    pipeline: r.pipeline, records: r.source, rows: r.rows, complex: r.complex, bins: r.bins,
    notes: r.notes, calibratedBy: r.calibratedBy, calibrationRows: r.calibrationRows, scoredRows: r.scoredRows,
    threshold: r.calibration.rule.threshold, referencePhase: r.referencePhase, referencePhaseUnit: 'rad',
    axisAngle: Math.atan2(r.calibration.axis.sin, r.calibration.axis.cos), axisAngleUnit: 'rad',
    ...(s ? {
      errorByOutcome: Object.fromEntries(s.states.map((st) => [st.state, { rate: st.error.rate, low: st.error.low, high: st.error.high, shots: st.shots, errors: st.errors }])),
      meanError: { rate: s.meanError.rate, low: s.meanError.low, high: s.meanError.high },
      visibility: s.visibility,
      snr: s.snr, snrConvention: 'separation of the fitted clean centres / pooled σ (two Gaussians and a relaxation ramp fitted to the labelled groups; amplitude SNR)',
      sigma: s.sigma, sigmaUnit: r.unit,
      valueByOutcome: Object.fromEntries(r.outcomes.map((o, j) => [o, s.outcomeValues[j] ?? null])), valueByOutcomeUnit: r.unit,
      ...(s.banded ? { discardFraction: s.discardFraction, postSelectedError: s.postSelectedError, discardsAsFailuresError: s.discardsAsFailuresError } : {}),
    } : {}),
    out, files: r.files,
  };
}

export function makeAnalyzeCommand(): Command {
  return withRecordOptions(new Command('analyze')
    .description('run a processing pipeline on recorded traces (Arrow, Parquet, .npy/.npz or HDF5), scored against labels when given'), 'none (a pipeline file may say otherwise)')
    .requiredOption('--out <dir>', 'folder for the tables (must be empty unless --force)')
    .option('--pipeline <file>', 'pipeline file (YAML or JSON): the processing keys, sample rate, carrier, calibration (default: boxcar over the record, referencePhase auto, midpoint threshold)')
    .option('--parquet', 'also write every table as Parquet (X.parquet beside X.arrow), for DuckDB, polars and other Parquet readers')
    .option('--json', 'print the result as one JSON object on stdout')
    .option('--force', 'replace the files of a non-empty --out folder')
    .action(async (records: string, opts: RecordOptions & { out: string; pipeline?: string; parquet?: boolean; json?: boolean; force?: boolean }) => {
      const [{ analyzeRecords }, { withInterruptSignals }, { classifierNamed }] = await Promise.all([
        import('../../library/analyze.ts'), import('../signals.ts'), import('../../classify/registry.ts'),
      ]);
      const r = await withInterruptSignals((signal) => analyzeRecords({
        records, pipeline: opts.pipeline, outDir: opts.out, labels: opts.labels, force: opts.force,
        sampleRate: opts.sampleRate, carrier: opts.carrier, window: opts.window, scale: opts.scale,
        unit: opts.unit, parquet: opts.parquet, signal,
      }));
      for (const n of r.notes) process.stderr.write(`note: ${n}\n`);
      if (opts.json) {
        process.stdout.write(JSON.stringify(analysisJson(r, opts.out), (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)) + '\n');
      } else process.stdout.write(formatAnalysis(r, opts.out, classifierNamed(r.classifier).signalUnitStatistic) + '\n');
    });
}
