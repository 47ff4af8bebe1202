/**
 * `run --json` names the unit of every dimensioned number: `parameterUnits` beside
 * `parameters` (points, comparisons, the operating point), and `<field>Unit` beside threshold,
 * σ, analytic σ, predicted σ, each noise source's σ and variance, and the refinement's values.
 * The threshold and σ of a classifier whose statistic is dimensionless (a log-odds) have unit ''.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../support/cli.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-json-units-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SCENARIO = readFileSync('test/fixtures/scenarios/small.yaml', 'utf8')
  .replace(/^shots: .*$/m, 'shots: 2048')
  .replace(/^processing:[\s\S]*$/m, `pipelines:
  - { name: plain, threshold: optimal }
  - { name: model, classifier: likelihood, decimate: 4 }
sweep:
  vary:
    - key: signal.noise.white.density
      values: ["20 fA/rtHz", "40 fA/rtHz"]
    - key: timing.window.length
      values: ["1 us", "2 us", "3 us"]
`);

interface JsonPoint {
  pipeline: string;
  parameters: Record<string, number>;
  parameterUnits: Record<string, string>;
  [k: string]: unknown;
}

describe('--json units', () => {
  it('every dimensioned field has its unit', async () => {
    const file = join(dir, 'units.yaml');
    writeFileSync(file, SCENARIO);
    const r = await runCli(['run', file, '--out', join(dir, 'out'), '--json', '--quiet', '--no-report', '--refine', 'timing.window.length', '--refine-points', '2']);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout) as { points: JsonPoint[]; comparisons: JsonPoint[]; operatingPoint: Record<string, any> };
    const swept = { signal_noise_white_density: 'A/rtHz', timing_window_length: 's' };
    expect(json.points).toHaveLength(2 * 8);
    for (const p of json.points) {
      expect(p.parameterUnits).toEqual(swept);
      const unit = p.pipeline === 'model' ? '' : 'A';
      expect({ threshold: p.thresholdUnit, sigma: p.sigmaUnit, analyticSigma: p.analyticSigmaUnit }, p.pipeline)
        .toEqual({ threshold: unit, sigma: unit, analyticSigma: unit });
      if (p.pipeline === 'plain') {
        expect(p.predictedSigmaUnit).toBe('A');
        for (const s of p.noiseBudget as Record<string, unknown>[]) expect([s.sigmaUnit, s.varianceUnit, s.densityUnit]).toEqual(['A', 'A^2', 'A/rtHz']);
      }
    }
    expect(json.comparisons.length).toBeGreaterThan(0);
    for (const c of json.comparisons) expect(c.parameterUnits).toEqual(swept);
    const op = json.operatingPoint;
    for (const p of op.pipelines) expect(p.lowestError.parameterUnits).toEqual(swept);
    expect(op.refined.intervalUnit).toBe('s');
    expect(op.refined.bracketUnit).toBe('s');
    expect(op.refined.best.valueUnit).toBe('s');
    for (const q of op.refined.points) expect(q.valueUnit).toBe('s');
  }, 120_000);
});
