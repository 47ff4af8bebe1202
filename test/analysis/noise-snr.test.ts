/**
 * SNR against the integration time through the trace engine (common practice, no source): with
 * white noise only SNR ∝ √τ; with sensor-side 1/f noise, whose σ hardly falls with τ, it levels off.
 * SNR = separation of the state means / pooled σ of the I output, both simulated.
 */
import { describe, expect, it } from 'vitest';
import { fitLine } from '../support/fit.ts';
import { flicker, noiseScenario, runNoise, type NoiseCase } from '../support/noise-helpers.ts';

function snrCurve(base: NoiseCase, windows: number[]): { snr: number[]; predicted: number[] } {
  const snr: number[] = [], predicted: number[] = [];
  for (const w of windows) {
    const run = runNoise(noiseScenario({ ...base, windowLength: w }));
    const separation = Math.abs(run.means[1]! - run.means[0]!);
    snr.push(separation / run.sigma);
    predicted.push(separation / run.prediction.sigma);
  }
  return { snr, predicted };
}

const slope = (x: number[], y: number[]) => fitLine(x.map(Math.log), y.map(Math.log)).slope;

describe('SNR against the window length τ', () => {
  it('white noise only: log–log slope 0.5 ± 0.02 over a decade of τ (2–20 µs)', () => {
    const windows = [2e-6, 3.2e-6, 5e-6, 8e-6, 12.6e-6, 20e-6];
    const { snr, predicted } = snrCurve({ carrier: 'sine', white: 1 }, windows);
    const s = slope(windows, snr);
    expect(Math.abs(s - 0.5), `simulated SNR ${snr.map((x) => x.toFixed(3))}, slope ${s}`).toBeLessThan(0.02);
    expect(Math.abs(slope(windows, predicted) - 0.5)).toBeLessThan(0.02);
  });

  it('with sensor-side 1/f noise: the slope over the last half-decade is below 0.2', () => {
    // 4 MS/s, 500 kHz carrier, records of 200 µs back to back (10 240 shots, 2 s); white σ 1 per
    // sample, 1/f on [30 Hz, 50 kHz]
    const base: NoiseCase = {
      sampleRate: 4e6, carrierFrequency: 500e3, recordLength: 200e-6, carrier: 'sine', white: 1, shots: 10240,
      signal: { sources: [flicker('sensor', 0.006, 30, 50e3)] },
    };
    const windows = [2e-6, 6.3e-6, 20e-6, 63e-6, 200e-6];
    const { snr, predicted } = snrCurve(base, windows);
    const first = slope(windows.slice(0, 2), snr.slice(0, 2));
    const last = slope(windows.slice(3), snr.slice(3));
    const detail = `SNR ${snr.map((x) => x.toFixed(3))}, first half-decade slope ${first}, last ${last}`;
    expect(last, detail).toBeLessThan(0.2);
    // it levels off: it grew clearly while white noise still dominated
    expect(first, detail).toBeGreaterThan(0.3);
    expect(slope(windows.slice(3), predicted.slice(3))).toBeLessThan(0.2);
  });
});
