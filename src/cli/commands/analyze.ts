/** `singleshot analyze TRACES.arrow --pipeline FILE --out DIR [--labels COLUMN]`: run a pipeline on recorded traces. */
import { Command } from 'commander';
import { analyzeToDirectory, type AnalyzeResult } from '../../app/analyze.ts';
import { formatProbability } from '../format.ts';
import { withInterruptSignals } from '../signals.ts';

/** The readable summary of an analysis. */
export function formatAnalysis(r: AnalyzeResult, out: string): string {
  const lines = [`pipeline "${r.pipeline}": ${r.rows} records, ${r.calibrationRows} used for calibration, ${r.rows - r.calibrationRows} decided (${r.bins} bins each); threshold ${r.rule.threshold.toPrecision(4)}`];
  const s = r.scores;
  if (s) {
    const iv = (x: { rate: number; low: number; high: number }) => `${formatProbability(x.rate)} [${formatProbability(x.low)}, ${formatProbability(x.high)}]`;
    for (const b of s.byOutcome) lines.push(`  labelled ${b.outcome}: ${b.shots} shots, error ${iv(b.error)}`);
    lines.push(`  all labelled: ${s.shots} shots, error ${iv(s.error)} (95% Wilson)`);
    if (s.discarded > 0 || r.discarded.some((d) => d === 1)) {
      lines.push(`  ambiguous band: ${s.discarded} discarded (${formatProbability(s.discardFraction)}); kept error ${iv(s.postSelectedError)}, discards as failures ${iv(s.discardsAsFailuresError)}`);
    }
  }
  lines.push(`tables written to ${out}: ${r.files.join(', ')}`);
  return lines.join('\n');
}

export function makeAnalyzeCommand(): Command {
  return new Command('analyze')
    .description('run a processing pipeline on recorded traces (an Arrow table of sample lists), optionally scored against labels')
    .argument('<traces>', 'Arrow file with a column of records (e.g. traces.arrow from run --keep-traces raw)')
    .requiredOption('--pipeline <file>', 'pipeline file (YAML or JSON): the processing keys, sample rate, carrier, calibration')
    .requiredOption('--out <dir>', 'folder for the tables (must be empty unless --force)')
    .option('--labels <column>', 'score the outcomes against this label column')
    .option('--json', 'print the result as one JSON object on stdout')
    .option('--force', 'replace the files of a non-empty --out folder')
    .action(async (traces: string, opts: { pipeline: string; out: string; labels?: string; json?: boolean; force?: boolean }) => {
      const r = await withInterruptSignals((signal) => analyzeToDirectory({ tracesPath: traces, pipelinePath: opts.pipeline, outDir: opts.out, labels: opts.labels, force: opts.force, signal }));
      if (opts.json) {
        const json = { pipeline: r.pipeline, rows: r.rows, calibrationRows: r.calibrationRows, bins: r.bins, threshold: r.rule.threshold, scores: r.scores, out: opts.out, files: r.files };
        process.stdout.write(JSON.stringify(json, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)) + '\n');
      } else process.stdout.write(formatAnalysis(r, opts.out) + '\n');
    });
}
