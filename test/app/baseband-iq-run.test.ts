/**
 * A baseband I and Q run end to end:
 * - the demo (scenarios/demo-iq.yaml, invented numbers) runs from the command line, agrees with
 *   its budget and renders its report: the histogram, one raw panel per channel of every example
 *   shot, the demodulated records, the noise spectrum, with no plotting warning;
 * - `--keep-traces raw` keeps both raw channels as the columns in_phase and quadrature; the record
 *   readers (io/records/table.ts) read them as complex records, and the pipeline's chain run on
 *   them (dsp/process-record.ts) gives each shot's integrated I and Q of shots.arrow to Float32
 *   rounding of the records (|Δ| ≤ 1e−6 of the value scale; common practice, no source);
 * - the run estimate counts both channels.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { tableFromIPC } from 'apache-arrow';
import { runMain } from '../support/cli.ts';
import { buildReport } from '../../src/app/report.ts';
import { tableRecords } from '../../src/io/records/table.ts';
import { loadScenarioFile } from '../../src/scenario/load.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { integrateBins, makeProcessScratch, processRecord } from '../../src/dsp/process-record.ts';
import { estimateRun, keptTracesEstimate } from '../../src/run/estimate.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-iq-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the baseband I and Q demo', () => {
  it('runs from the command line, agrees with its budget, and its report renders', async () => {
    const out = join(dir, 'demo');
    const r = await runMain(['run', 'scenarios/demo-iq.yaml', '--out', out, '--shots', '16384', '--json']);
    expect(r.code, r.err).toBe(0);
    const json = JSON.parse(r.out) as { points: { agreement: boolean; snr: number; analyticSnr: number }[] };
    expect(json.points[0]!.agreement).toBe(true);
    expect(Math.abs(json.points[0]!.snr / json.points[0]!.analyticSnr - 1)).toBeLessThan(0.05);
    const page = readFileSync(join(out, 'report.html'), 'utf8');
    // histogram, IQ plane, raw records, demodulated records (no sweep; no carrier to zoom on)
    expect(page.match(/<svg[^>]*class="marks"/g) ?? []).toHaveLength(4);
    expect(page).toContain('I channel');
    expect(page).toContain('Q channel');
    expect(page).toContain('the digitised I and Q channels as synthesised');
    expect((await buildReport(out)).warnings).toEqual([]);
  }, 120_000);
});

describe('kept raw traces of I and Q', () => {
  it('are the two channels, read back as complex records that reproduce the integrated I and Q', async () => {
    const file = join(dir, 'iq.yaml');
    writeFileSync(file, [
      'name: kept iq', 'seed: 4', 'shots: 1024', 'calibrationShots: 1024',
      'timing: { sampleRate: 20 MHz, recordLength: 3 us, window: { start: 0.5 us, length: 2 us } }',
      'states:', '  - { name: g, level: { magnitude: 2 mV, phase: 50 deg }, outcome: "0" }', '  - { name: e, level: { magnitude: 1.5 mV, phase: -20 deg }, outcome: "1" }',
      'transitions: [{ from: e, to: g, lifetime: 10 us }]',
      'signal: { carrier: baseband-iq, noise: { white: { perSample: 1 mV }, correlated: { sigma: 0.5 mV, correlationTime: 0.2 us, injection: amplifier } } }',
      'processing: { filter: { butterworth: { order: 2, cutoff: 3 MHz } }, decimate: 4 }',
    ].join('\n'));
    const out = join(dir, 'kept');
    const r = await runMain(['run', file, '--out', out, '--keep-traces', 'raw', '--no-report', '--quiet']);
    expect(r.code, r.err).toBe(0);
    const traces = tableFromIPC(readFileSync(join(out, 'traces.arrow')));
    expect(traces.schema.fields.map((f) => f.name)).toEqual(expect.arrayContaining(['in_phase', 'quadrature']));
    expect(traces.getChild('record')).toBeNull();
    const records = tableRecords('traces.arrow', traces, undefined, 1);
    expect(records.complex).toBe(true);
    expect(records.samples).toBe(60);
    const shots = tableFromIPC(readFileSync(join(out, 'shots.arrow')));
    const loaded = await loadScenarioFile(file);
    const point = compilePoint(loaded.scenario);
    const chain = point.pipelines[0]!.chain;
    const record = new Float64Array(2 * records.samples);
    const scratch = makeProcessScratch(chain, records.samples);
    const binsI = new Float64Array(chain.bins), binsQ = new Float64Array(chain.bins);
    const inPhase = shots.getChild('in_phase')!.toArray() as Float64Array, quadrature = shots.getChild('quadrature')!.toArray() as Float64Array;
    let worst = 0, scale = 0;
    for (let row = 0; row < records.rows; row += 7) {
      records.row(row, record.subarray(0, records.samples), record.subarray(records.samples));
      processRecord(chain, record, scratch, binsI, binsQ, 0);
      const i = integrateBins(binsI, 0, chain.binWeights), q = integrateBins(binsQ, 0, chain.binWeights);
      worst = Math.max(worst, Math.abs(i - inPhase[row]!), Math.abs(q - quadrature[row]!));
      scale = Math.max(scale, Math.abs(inPhase[row]!), Math.abs(quadrature[row]!));
    }
    expect(worst, `max |kept − run| = ${worst} for values up to ${scale}`).toBeLessThanOrEqual(1e-6 * scale);
    // the Q channel is not zero, and not the I channel
    const first = new Float64Array(records.samples), second = new Float64Array(records.samples);
    records.row(0, first, second);
    expect(second.some((x, k) => x !== 0 && x !== first[k])).toBe(true);
  }, 60_000);
});

describe('the run estimate of I and Q', () => {
  it('counts both channels: samples, compiled tables and kept raw traces double', () => {
    const real = twoStateScenario({ carrier: 'none', shots: 1000 });
    const iq = twoStateScenario({ carrier: 'baseband-iq', shots: 1000 });
    const [a, b] = [estimateRun([real]), estimateRun([iq])];
    expect(b.samples).toBe(2 * a.samples);
    expect(b.memory.compiled).toBe(2 * a.memory.compiled!);
    expect(keptTracesEstimate(iq, 'raw').valuesPerShot).toBe(2 * keptTracesEstimate(real, 'raw').valuesPerShot);
    expect(keptTracesEstimate(iq, 'baseband').valuesPerShot).toBe(keptTracesEstimate(real, 'baseband').valuesPerShot);
  });
});
