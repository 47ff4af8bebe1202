/**
 * `analyze` on par with `run`: the records a run kept, analysed with the run's pipeline keys and a
 * calibration from their labels, give the run's error and SNR within intervals — for a carrier
 * record with relaxation and preparation/mapping errors, for baseband I and Q (complex records),
 * and with the likelihood classifier, which learns its model from the calibration rows; the
 * folder holds the run's summary columns and `report` renders it; without labels every record
 * is still decided. Intervals: Wilson 95 % of each error (Wilson, JASA 22, 209 (1927)); the two
 * analyses share their shots, so their errors differ by far less than two independent ones would.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { beforeAll, describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { analyzeToDirectory } from '../../src/app/recorded/analyze.ts';
import { buildReport } from '../../src/app/report.ts';

const work = mkdtempSync(join(tmpdir(), 'singleshot-analyze-records-'));
const read = (dir: string, f: string) => tableFromIPC(readFileSync(join(dir, f)));
const first = (dir: string, f: string, column: string) => read(dir, f).getChild(column)!.get(0) as number;

/** The run's summary row of pipeline `name`. */
function runRow(dir: string, name = 'main'): (column: string) => number {
  const t = read(dir, 'summary.arrow');
  const row = Array.from({ length: t.numRows }, (_, k) => k).find((k) => t.getChild('pipeline')!.get(k) === name)!;
  return (column) => t.getChild(column)!.get(row) as number;
}

beforeAll(async () => {
  await runToDirectory({ scenarioPath: 'test/fixtures/scenarios/small.yaml', outDir: join(work, 'small'), keepTraces: 'raw', shots: 16384, report: false });
  await runToDirectory({ scenarioPath: 'test/fixtures/scenarios/iq.yaml', outDir: join(work, 'iq'), keepTraces: 'raw', shots: 8192, report: false });
}, 120_000);

describe('analyze agrees with run', () => {
  it('a carrier record with relaxation, preparation and mapping errors: error and SNR within intervals', async () => {
    const out = join(work, 'small-analyzed');
    const pipeline = join(work, 'small.yaml');
    (await import('node:fs')).writeFileSync(pipeline, 'referencePhase: auto\nthreshold: optimal\ncalibration: { labels: intended_outcome, fraction: 0.25 }\n');
    const r = await analyzeToDirectory({ records: join(work, 'small', 'traces.arrow'), pipelinePath: pipeline, labels: 'intended_outcome', outDir: out });
    const run = runRow(join(work, 'small'));
    const s = r.summary!;
    expect(s.shots).toBe(16384 - 4096);
    // the same decision rule on the same kind of shots: the error lies in the run's interval (and the run's in ours)
    expect(s.meanError.rate).toBeGreaterThan(run('mean_error_low'));
    expect(s.meanError.rate).toBeLessThan(run('mean_error_high'));
    expect(run('mean_error')).toBeGreaterThan(s.meanError.low);
    expect(run('mean_error')).toBeLessThan(s.meanError.high);
    // SNR d = Δμ/σ from the fitted clean centres vs the run's clean shots: each has a relative
    // variance ≈ 2/(n_g·d²) + 1/(2n) (delta method: two centres of n_g ≈ 6000 shots, σ̂ of n ≈
    // 12000), a relative standard error ≈ 0.8 % at d ≈ 4.6; 3 % is about 4 of them
    expect(Math.abs(s.snr / run('snr') - 1)).toBeLessThan(0.03);
    expect(Math.abs(s.sigma / run('sigma') - 1)).toBeLessThan(0.03);
    // the run's summary columns, with the labelled outcomes for states
    const names = read(out, 'summary.arrow').schema.fields.map((f) => f.name);
    for (const c of ['mean_error', 'mean_error_low', 'visibility', 'error_0', 'error_1_high', '0_reported_1', 'snr', 'sigma', 'value_mean_0', 'value_sigma_1', 'threshold', 'axis_angle']) expect(names).toContain(c);
    expect(read(out, 'summary.arrow').schema.fields.find((f) => f.name === 'sigma')!.metadata.get('unit')).toBe('A');
    // no model behind records: no analytic value and no agreement to claim
    expect(first(out, 'summary.arrow', 'analytic_mean_error')).toBeNull();
    expect(first(out, 'summary.arrow', 'agreement')).toBeNull();
    const manifest = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8')) as { kind: string; seed?: number; scenario?: string; analysis: { records: string } };
    expect(manifest.kind).toBe('analysis');
    expect(manifest.seed).toBeUndefined();
    expect(manifest.scenario).toBeUndefined();
    // named by the file, not its folder: the same records analysed anywhere give the same bytes
    expect(manifest.analysis.records).toBe('traces.arrow');
    // report renders the folder: values, IQ plane (a carrier gives Q), records, spectrum
    const report = await buildReport(out);
    expect(report.warnings).toEqual([]);
    expect(report.plots).toBe(4);
    expect(report.html).toContain('What the records show');
  }, 60_000);

  it('baseband I and Q recorded as two channels (complex records): SNR and error within intervals', async () => {
    const out = join(work, 'iq-analyzed');
    const r = await analyzeToDirectory({ records: join(work, 'iq', 'traces.arrow'), labels: 'intended_outcome', outDir: out });
    expect(r.complex).toBe(true);
    const run = runRow(join(work, 'iq'), 'plain');
    const s = r.summary!;
    expect(Math.abs(s.snr / run('snr') - 1)).toBeLessThan(0.03);
    // the default pipeline (midpoint threshold) against the run's own: intervals overlap
    expect(s.meanError.low).toBeLessThan(run('mean_error_high'));
    expect(s.meanError.high).toBeGreaterThan(run('mean_error_low'));
    expect((await buildReport(out)).warnings).toEqual([]);
  }, 60_000);

  it('the likelihood classifier learns its model from the calibration rows alone and does no worse than the boxcar', async () => {
    const pipeline = join(work, 'likelihood.yaml');
    (await import('node:fs')).writeFileSync(pipeline, 'classifier: likelihood\ndecimate: 5\ncalibration: { labels: intended_outcome, fraction: 0.25 }\n');
    const r = await analyzeToDirectory({ records: join(work, 'small', 'traces.arrow'), pipelinePath: pipeline, labels: 'intended_outcome', outDir: join(work, 'likelihood') });
    const boxcar = await analyzeToDirectory({ records: join(work, 'small', 'traces.arrow'), labels: 'intended_outcome', outDir: join(work, 'boxcar') });
    expect(r.classifier).toBe('likelihood');
    // on the same scored rows the likelihood decision is at least as good (within the boxcar's interval, or below it)
    expect(r.summary!.meanError.rate).toBeLessThan(boxcar.summary!.meanError.high);
    // its own statistic (the log-odds) is in shots.arrow
    const statistic = read(join(work, 'likelihood'), 'shots.arrow').getChild('statistic')!;
    expect(Number.isFinite(statistic.get(5000) as number)).toBe(true);
  }, 60_000);

  it('without labels every record is decided and nothing is scored', async () => {
    const out = join(work, 'unlabelled');
    const r = await analyzeToDirectory({
      records: join(work, 'small', 'traces.arrow'), pipelinePath: undefined, outDir: out,
    }).catch((e: Error) => e);
    // the default pipeline needs a calibration (auto phase on a carrier): without labels it is refused in one line
    expect(r).toBeInstanceOf(Error);
    expect((r as Error).message).toMatch(/calibration: expected a calibration for referencePhase: auto/);
    const fixed = join(work, 'fixed.yaml');
    (await import('node:fs')).writeFileSync(fixed, 'referencePhase: 20 deg\nthreshold: { fixed: 40 pA }\n');
    const d = await analyzeToDirectory({ records: join(work, 'small', 'traces.arrow'), pipelinePath: fixed, outDir: out });
    expect(d.summary).toBeNull();
    expect(d.files).toEqual(['shots.arrow', 'noise.arrow', 'traces.arrow']);
    expect(read(out, 'shots.arrow').numRows).toBe(16384);
    expect((await buildReport(out)).warnings).toEqual([]);
  }, 60_000);
});
