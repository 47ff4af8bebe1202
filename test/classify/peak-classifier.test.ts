/**
 * The peak classifier (src/classify/peak-classifier.ts). On white noise alone, the rate at which
 * the maximum of the filtered, decimated record exceeds a fixed threshold is a false positive;
 * it is checked against an independent numpy/scipy Monte Carlo of the same chain
 * (test/fixtures/make-peak.py: scipy.signal.lfilter single-pole from rest, decimation at the
 * block ends, 2·10⁶ records) — the two estimates must agree at 99.9 % (two-proportion test).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { peakClassifier } from '../../src/classify/peak-classifier.ts';

interface PeakFixture {
  records: number;
  cases: { threshold: number; exceed: number; rate: number }[];
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/peak.json', import.meta.url), 'utf8')) as PeakFixture;

function scenario(threshold: number): string {
  return `
name: peak false positives
seed: 77
shots: 400000
calibrationShots: 2048
batchSize: 16384
timing: { sampleRate: 10 MHz, recordLength: 10 us, window: { start: 1 us, length: 8 us } }
states:
  - { name: quiet, level: 0, outcome: "0" }
  - { name: blip, level: 6, outcome: "1" }
signal:
  carrier: none
  noise: { white: { perSample: 1 } }
processing:
  referencePhase: 0 deg
  filter: { singlePole: { cutoff: 500 kHz } }
  decimate: 4
  classifier: peak
  threshold: { fixed: ${threshold} }
`;
}

describe('peak classifier on white noise alone: the maximum\'s exceedance rate against an independent Monte Carlo', () => {
  it.each(fixture.cases)('threshold $threshold (numpy/scipy: $rate)', async ({ threshold, exceed }) => {
    const loaded = loadScenarioText(scenario(threshold), 'peak.yaml');
    const r = await runPoints([{ parameters: {}, scenario: loaded.scenario }], { engine: 'traces' });
    const quiet = r.points[0]!.summaries[0]!.states[0]!;
    const p1 = quiet.errors / quiet.shots, p2 = exceed / fixture.records;
    const pooled = (quiet.errors + exceed) / (quiet.shots + fixture.records);
    const z = (p1 - p2) / Math.sqrt(pooled * (1 - pooled) * (1 / quiet.shots + 1 / fixture.records));
    // two-sided 99.9 %: |z| < 3.2905, the normal quantile at 0.9995 (Abramowitz & Stegun, Table 26.5)
    expect(Math.abs(z), `engine ${p1} (${quiet.shots} shots), numpy ${p2} (${fixture.records} records), z = ${z}`).toBeLessThan(3.2905);
  }, 60_000);

  it('decides on the maximum when outcome 1 lies above, on the minimum when below', () => {
    const records = { bins: 3, count: 2, projected: Float64Array.of(0, 0, 0, -1, -5, -1), outcome: Uint8Array.of(0, 1), cleanState: Uint8Array.of(0, 1) };
    const model = peakClassifier.fit!(records, undefined as never, { cos: 1, sin: 0 }, null);
    expect(model.side).toBe(-1);
    const stat = peakClassifier.statistic!(model);
    expect(stat(Float64Array.of(3, -2, 7), 0, 3)).toBe(-2);
    expect(peakClassifier.statistic!({ side: 1 })(Float64Array.of(3, -2, 7), 0, 3)).toBe(7);
  });
});
