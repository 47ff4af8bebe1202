/** `singleshot fit RECORDS --out twin.yaml`: fit a scenario to recorded traces. */
import { Command } from 'commander';
import type { FitTwinResult } from '../../library/fit.ts';
import { formatQuantity } from '../../scenario/units.ts';
import { withRecordOptions, type RecordOptions } from '../quantity-option.ts';
import { positiveInteger, seedNumber } from './run.ts';
import { DEFAULTS } from '../../library/defaults.ts';

/** The readable summary of a fit. */
export function formatFit(r: FitTwinResult): string {
  const f = r.fitted;
  const q = (x: number, u: string) => formatQuantity(x, u, 4);
  const signal = r.unit;
  const lines = [`fitted ${f.used} of ${f.rows} records of ${f.samples} ${f.complex ? 'I/Q pairs' : 'samples'} at ${q(f.sampleRate, 'Hz')}`];
  for (const s of f.states) {
    const level = f.carrier.shape === 'none' ? q(s.re.value, signal) : `${q(s.re.value, signal)} ${s.im.value < 0 ? '−' : '+'} ${q(Math.abs(s.im.value), signal)}i`;
    lines.push(`  ${s.name} (outcome ${s.outcome}): level ${level}, share ${s.share.value.toFixed(3)}`);
  }
  lines.push(`  carrier: ${f.carrier.shape === 'none' ? 'none' : `${f.carrier.shape} at ${q(f.carrier.frequency.value, 'Hz')} (${f.carrier.origin})`}`);
  for (const t of f.transitions.filter((x) => x.kept)) lines.push(`  ${t.kind} ${f.states[t.from]!.name} → ${f.states[t.to]!.name}: lifetime ${q(t.lifetime.value, 's')} ± ${q(t.lifetime.standardError, 's')}`);
  for (const p of f.preparation ?? []) lines.push(`  preparation error of ${f.states[p.state]!.name}: ${p.probability.toPrecision(3)} (95 % [${p.low.toPrecision(2)}, ${p.high.toPrecision(2)}])`);
  const n = f.noise, density = signal ? `${signal}/rtHz` : '';
  lines.push(`  noise: white ${q(n.white.value, density)}${n.flicker.test.kept ? `, 1/f ${q(n.flicker.density.value, density)} at ${q(n.flicker.at, 'Hz')} (exponent ${n.flicker.exponent.value.toFixed(3)})` : ''}${n.correlated.test.kept ? `, correlated ${q(n.correlated.density.value, density)} over ${q(n.correlated.correlationTime.value, 's')}` : ''}`);
  for (const note of r.notes) lines.push(`note: ${note}`);
  lines.push(`scenario written to ${r.scenarioPath}` + (r.reportPath ? `\nreport: ${r.reportPath}` : ''));
  return lines.join('\n');
}

/** The `fit` command. */
export function makeFitCommand(): Command {
  return withRecordOptions(new Command('fit')
    .description('fit a scenario (a twin) to recorded traces: levels, carrier, noise spectrum, transition rates, preparation errors'), 'found in real records')
    .requiredOption('--out <file>', 'the scenario file to write (the fit report goes beside it, as .html)')
    .option('--resamples <n>', `bootstrap resamples for the uncertainties (default ${DEFAULTS.resamples})`, positiveInteger('--resamples'))
    .option('--seed <n>', `seed of the bootstrap (default ${DEFAULTS.bootstrapSeed})`, seedNumber)
    .option('--no-report', 'do not write the fit report')
    .option('--force', 'replace an existing --out file')
    .option('--json', 'print the fitted numbers as one JSON object on stdout')
    .action(async (records: string, o: RecordOptions & { out: string; resamples?: number; seed?: number; report: boolean; force?: boolean; json?: boolean }) => {
      const { fitTwin } = await import('../../library/fit.ts');
      const r = await fitTwin({
        records, out: o.out, labels: o.labels, sampleRate: o.sampleRate, carrier: o.carrier, window: o.window, scale: o.scale,
        unit: o.unit, resamples: o.resamples, seed: o.seed, report: o.report, force: o.force,
      });
      for (const w of r.warnings) process.stderr.write(`warning: ${w}\n`);
      if (o.json) {
        const { view: _view, noise, ...rest } = r.fitted;
        const { fit: _fit, ...noiseRest } = noise;
        const json = { ...rest, noise: noiseRest, notes: r.notes, scenario: r.scenarioPath, report: r.reportPath };
        process.stdout.write(JSON.stringify(json, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)) + '\n');
      } else process.stdout.write(formatFit(r) + '\n');
    });
}
