/**
 * `singleshot fit` round trips: simulate an invented scenario (test/fixtures/fit/) keeping its
 * records, fit a twin to the records alone, then
 * - the twin's numbers against the scenario's own (the truth that made the records): levels and
 *   white density within 2 %, T1 within 10 %, 1/f density within 20 %, the preparation error
 *   inside the fit's 95 % Wilson interval (Wilson, J. Am. Stat. Assoc. 22, 209 (1927)) — the
 *   bounds are the acceptance of the fit command (common practice, no source);
 * - the twin's simulated mean error inside the 99 % Wilson interval of the mean error of the
 *   original run — the run that made the records, so the twin is held to the power of the data
 *   it was fitted from (analysis/intervals.ts) — the twin run with four times the shots so that
 *   its own Monte Carlo spread is half the original's; and, as a negative control, a twin with a
 *   wrong T1 outside it;
 * - the written file is accepted by the project's scenario parser;
 * - in (b), the same records as a NumPy file that does not say its carrier: the carrier found.
 * Fixed seeds throughout (the scenarios' and the fit's), so every run gives the same numbers.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { fitToScenario, type FitResult } from '../../src/app/recorded/fit.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { openRecords } from '../../src/io/records/open.ts';
import { writeNpy } from '../support/npy-file.ts';

const work = mkdtempSync(join(tmpdir(), 'singleshot-fit-'));

/** Simulates `scenario` keeping its records (the original run), fits them, and runs the twin. */
async function roundTrip(name: string, keep: 'raw' | 'baseband', labels: string | undefined) {
  const scenario = `test/fixtures/fit/${name}.yaml`;
  const dir = join(work, name);
  const original = await runToDirectory({ scenarioPath: scenario, outDir: dir, keepTraces: keep, engine: 'traces', workers: 1, report: false, shotsTable: false });
  const fit = await fitToScenario({ records: join(dir, 'traces.arrow'), labels, out: join(work, `${name}-twin.yaml`), resamples: 12, seed: 7 });
  const summary = original.result.points[0]!.summaries[0]!;
  const twin = await runTwin(fit.scenarioPath, `${name}-twin`, 4 * summary.shots);
  return { fit, original: summary, twin, interval: wilsonInterval(summary.meanErrors, summary.shots, 0.99) };
}

/** Runs a twin scenario file with `shots` shots (exact engine where it applies) and returns its summary. */
async function runTwin(path: string, name: string, shots: number) {
  const run = await runToDirectory({ scenarioPath: path, outDir: join(work, name), engine: 'auto', workers: 1, report: false, shotsTable: false, shots, seed: 202 });
  return run.result.points[0]!.summaries[0]!;
}

type Trip = Awaited<ReturnType<typeof roundTrip>>;
const within = (got: number, truth: number, tolerance: number) => Math.abs(got / truth - 1) <= tolerance;
const level = (f: FitResult, t: number) => f.fitted.states[t]!;

describe('fit: (a) baseband records with relaxation (T1) and white noise', () => {
  let r: Trip;
  beforeAll(async () => { r = await roundTrip('relaxing-baseband', 'raw', undefined); }, 300_000);

  it('recovers the levels and the white density within 2 % and T1 within 10 %', () => {
    // truth: test/fixtures/fit/relaxing-baseband.yaml (40 pA, 140 pA, 100 fA/√Hz, T1 = 100 µs)
    expect(r.fit.fitted.carrier.shape).toBe('none');
    expect(within(level(r.fit, 0).re.value, 40e-12, 0.02), `lower ${level(r.fit, 0).re.value}`).toBe(true);
    expect(within(level(r.fit, 1).re.value, 140e-12, 0.02), `upper ${level(r.fit, 1).re.value}`).toBe(true);
    expect(within(r.fit.fitted.noise.white.value, 100e-15, 0.02), `white ${r.fit.fitted.noise.white.value}`).toBe(true);
    const relaxation = r.fit.fitted.transitions.find((t) => t.kind === 'relaxation')!;
    expect(relaxation.kept).toBe(true);
    expect(within(relaxation.lifetime.value, 100e-6, 0.1), `T1 ${relaxation.lifetime.value}`).toBe(true);
    // negative controls: nothing the scenario does not have
    expect(r.fit.fitted.transitions.find((t) => t.kind === 'excitation')!.kept).toBe(false);
    expect(r.fit.fitted.noise.flicker.test.kept || r.fit.fitted.noise.correlated.test.kept).toBe(false);
  });

  it('the twin errs as often as the original (inside its 99 % interval)', () => {
    expect(r.twin.meanError.rate, `twin ${r.twin.meanError.rate}, original [${r.interval.low}, ${r.interval.high}]`).toBeGreaterThanOrEqual(r.interval.low);
    expect(r.twin.meanError.rate).toBeLessThanOrEqual(r.interval.high);
  });

  it('negative control: the same twin with T1 doubled errs less often than the original\'s interval allows', async () => {
    const text = readFileSync(r.fit.scenarioPath, 'utf8');
    const lifetime = /lifetime: ([\d.]+) µs/.exec(text)!;
    const wrong = join(work, 'relaxing-baseband-wrong.yaml');
    writeFileSync(wrong, text.replace(lifetime[0], `lifetime: ${2 * Number(lifetime[1])} µs`));
    const summary = await runTwin(wrong, 'relaxing-baseband-wrong', 4 * r.original.shots);
    expect(summary.meanError.rate, `wrong twin ${summary.meanError.rate}, original [${r.interval.low}, ${r.interval.high}]`).toBeLessThan(r.interval.low);
  }, 60_000);
});

describe('fit: (b) records on a sine carrier with white and 1/f noise', () => {
  let r: Trip;
  beforeAll(async () => { r = await roundTrip('carrier-flicker', 'raw', undefined); }, 300_000);

  it('recovers the carrier, the levels and the white density within 2 %, and the 1/f density within 20 %', () => {
    // truth: test/fixtures/fit/carrier-flicker.yaml (1 MHz at 30°, 50 pA, 130 pA, white 50 fA/√Hz, 1/f 200 fA/√Hz at 100 kHz, α = 1)
    const c = r.fit.fitted.carrier;
    if (c.shape === 'none') throw new Error('no carrier found');
    expect(c.shape).toBe('sine');
    expect(Math.abs(c.frequency.value - 1e6)).toBeLessThan(0.001 * 1e6);
    expect(within(level(r.fit, 0).re.value, 50e-12, 0.02), `lower ${level(r.fit, 0).re.value}`).toBe(true);
    expect(within(level(r.fit, 1).re.value, 130e-12, 0.02), `upper ${level(r.fit, 1).re.value}`).toBe(true);
    expect(within(r.fit.fitted.noise.white.value, 50e-15, 0.02), `white ${r.fit.fitted.noise.white.value}`).toBe(true);
    const fl = r.fit.fitted.noise.flicker;
    expect(fl.test.kept).toBe(true);
    // the truth's density at the fit's reference frequency: 200 fA/√Hz·(100 kHz/f)^(1/2)
    const truth = 200e-15 * Math.sqrt(100e3 / fl.at);
    expect(within(fl.density.value, truth, 0.2), `1/f ${fl.density.value} against ${truth} at ${fl.at} Hz`).toBe(true);
    expect(Math.abs(fl.exponent.value - 1)).toBeLessThan(0.1);
  });

  it('the twin errs as often as the original (inside its 99 % interval)', () => {
    expect(r.twin.meanError.rate, `twin ${r.twin.meanError.rate}, original [${r.interval.low}, ${r.interval.high}]`).toBeGreaterThanOrEqual(r.interval.low);
    expect(r.twin.meanError.rate).toBeLessThanOrEqual(r.interval.high);
  });

  it('finds the carrier itself in records that do not say it (a NumPy file), within four standard errors', async () => {
    const set = await openRecords(join(work, 'carrier-flicker', 'traces.arrow'));
    const x = new Float64Array(set.rows * set.samples), row = new Float64Array(set.samples);
    for (let i = 0; i < set.rows; i++) { set.row(i, row, null); x.set(row, i * set.samples); }
    const npy = join(work, 'carrier-flicker.npy');
    writeNpy(npy, x, [set.rows, set.samples]);
    const fit = await fitToScenario({ records: npy, out: join(work, 'carrier-flicker-found.yaml'), sampleRate: 20e6, window: { start: 2e-6, length: 20e-6 }, unit: 'A', resamples: 12, seed: 7, report: false });
    const c = fit.fitted.carrier;
    if (c.shape === 'none') throw new Error('no carrier found');
    expect(c.origin).toBe('found');
    expect(fit.notes.join('\n')).toMatch(/carrier: not given .* searched the records for one\ncarrier: found at [\d.]+ [kM]Hz \(sine\)/);
    // truth: 1 MHz at 30° (test/fixtures/fit/carrier-flicker.yaml)
    expect(Math.abs(c.frequency.value - 1e6), `${c.frequency.value} ± ${c.frequency.standardError}`).toBeLessThan(4 * c.frequency.standardError);
    expect(Math.abs(c.phase.value - Math.PI / 6), `${c.phase.value} ± ${c.phase.standardError}`).toBeLessThan(4 * c.phase.standardError);
    expect(within(level(fit, 0).re.value, 50e-12, 0.02)).toBe(true);
    expect(within(level(fit, 1).re.value, 130e-12, 0.02)).toBe(true);
  }, 60_000);
});

describe('fit: (c) I/Q pairs with a preparation error, with labels', () => {
  let r: Trip;
  beforeAll(async () => { r = await roundTrip('pairs-preparation', 'baseband', 'intended_outcome'); }, 300_000);

  it('recovers the complex levels and the white density within 2 %, and the preparation error inside its interval', () => {
    // truth: test/fixtures/fit/pairs-preparation.yaml: g = 50 + 20i pA, e = −30 + 80i pA, white 80 fA/√Hz, 4 % of "g" start as "e".
    // The twin turns both levels by one phase (a carrier phase): compare what a turn keeps — the magnitudes and the separation.
    const f = r.fit.fitted;
    expect(f.states.map((s) => s.outcome)).toEqual(['g', 'e']);
    const mag = (t: number) => Math.hypot(f.states[t]!.re.value, f.states[t]!.im.value);
    expect(within(mag(0), Math.hypot(50, 20) * 1e-12, 0.02), `|g| ${mag(0)}`).toBe(true);
    expect(within(mag(1), Math.hypot(-30, 80) * 1e-12, 0.02), `|e| ${mag(1)}`).toBe(true);
    const separation = Math.hypot(f.states[1]!.re.value - f.states[0]!.re.value, f.states[1]!.im.value - f.states[0]!.im.value);
    expect(within(separation, 100e-12, 0.02), `separation ${separation}`).toBe(true);
    expect(within(f.noise.white.value, 80e-15, 0.02), `white ${f.noise.white.value}`).toBe(true);
    const g = f.preparation!.find((p) => p.labelName === 'g')!;
    expect(g.low, `[${g.low}, ${g.high}]`).toBeLessThanOrEqual(0.04);
    expect(g.high).toBeGreaterThanOrEqual(0.04);
    const e = f.preparation!.find((p) => p.labelName === 'e')!;
    expect(e.low).toBe(0); // the scenario has none for "e"
  });

  it('the twin errs as often as the original (inside its 99 % interval)', () => {
    expect(r.twin.meanError.rate, `twin ${r.twin.meanError.rate}, original [${r.interval.low}, ${r.interval.high}]`).toBeGreaterThanOrEqual(r.interval.low);
    expect(r.twin.meanError.rate).toBeLessThanOrEqual(r.interval.high);
  });

  it('writes a scenario the project\'s parser accepts as it is, with every estimate\'s uncertainty beside it', () => {
    const text = readFileSync(r.fit.scenarioPath, 'utf8');
    const { scenario } = loadScenarioText(text, r.fit.scenarioPath);
    expect(scenario.states.map((s) => s.name)).toEqual(['lower', 'upper']);
    expect(scenario.preparationError[0]!.probability).toBeCloseTo(r.fit.fitted.preparation![0]!.probability, 4);
    expect(text).toMatch(/level: \{ re: -?[\d.]+ pA, im: -?[\d.]+ pA \} +# ± [\d.]+ [fp]A, ± [\d.]+ [fp]A/);
    expect(text).toMatch(/white: \{ density: [\d.]+ fA\/rtHz \} +# ± [\d.]+ fA\/rtHz/);
    expect(text).toMatch(/95 % Wilson \[/);
    expect(text).toMatch(/The records' file is dated \d{4}-\d\d-\d\d\./);
    expect(text).toMatch(/^ {2}unit: A$/m); // from the records column's field metadata
    expect(r.fit.notes.join('\n')).not.toMatch(/unit|window|sample rate/); // all three are in the file
  });

  it('writes the fit report beside it: the histogram, the spectrum and its residuals, drawn without a warning', () => {
    const page = readFileSync(r.fit.reportPath!, 'utf8');
    expect(r.fit.reportPath).toBe(r.fit.scenarioPath.replace(/\.yaml$/, '.html'));
    expect(page.match(/<svg/g)).toHaveLength(3);
    expect(r.fit.reportWarnings).toEqual([]);
    expect(page).toContain("content=\"default-src 'none'");
  });
});
