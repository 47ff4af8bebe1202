/**
 * The pieces of a baseband I and Q record (carrier: baseband-iq), one by one:
 * - the carrier tables put Re(L) on the I channel and Im(L) on the Q channel (channel-major);
 * - demodulation is the identity followed by z·e^(−iφ): checked against complex arithmetic done
 *   here directly (common practice, no source);
 * - sensor-side noise enters along the outcome separation (gain·cos α on I, gain·sin α on Q), and
 *   amplifier-side noise is one realisation per channel (signal/injection.ts);
 * - the analog response acts on each channel alone: the responded record equals the real
 *   first-order response y_k = L + (y_0 − L)·e^(−k/(fs·τ)) of Re(L) and Im(L) written here in
 *   closed form (the exponential solution of dy/dt = (L − y)/τ; common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { carrierTables, recordChannels, stateWaveform } from '../../src/signal/carrier.ts';
import { demodulate, makeReference } from '../../src/dsp/demodulate.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { writeRespondedSignal } from '../../src/signal/response.ts';
import { makePathBuffer } from '../../src/physics/chain.ts';
import { seenThrough } from '../../src/signal/injection.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const iq = { shape: 'baseband-iq' as const, frequency: 0, phase: 0 };

describe('carrier tables of baseband I and Q', () => {
  it('hold two channels: c = (1 | 0), s = (0 | −1), so a level writes Re into I and Im into Q', () => {
    const n = 7;
    const t = carrierTables(iq, n, 1e6);
    expect(recordChannels(iq)).toBe(2);
    expect(t.channels).toBe(2);
    expect(Array.from(t.inPhase)).toEqual([...Array(n).fill(1), ...Array(n).fill(0)]);
    expect(Array.from(t.quadrature)).toEqual([...Array(n).fill(0), ...Array(n).fill(-1)]);
    const w = stateWaveform(t, 0.3, -1.7, 2, new Float64Array(2 * n));
    expect(Array.from(w)).toEqual([...Array(n).fill(0.6), ...Array(n).fill(-3.4)]);
  });

  it('one channel for the other carriers', () => {
    expect(recordChannels({ shape: 'none' })).toBe(1);
    expect(recordChannels({ shape: 'sine' })).toBe(1);
    expect(carrierTables({ shape: 'none', frequency: 0, phase: 0 }, 5, 1e6).inPhase.length).toBe(5);
  });
});

describe('demodulating I and Q', () => {
  it.each([0, 0.4, -1.9, Math.PI])('rotates z = I + iQ by e^(−iφ), φ = %s', (phi) => {
    const n = 33;
    const record = Float64Array.from({ length: 2 * n }, (_, k) => Math.sin(1.3 * k) + 0.1 * k);
    const ref = makeReference(n, 1e6, 0, phi, 2)!;
    const outI = new Float64Array(n), outQ = new Float64Array(n);
    demodulate(record, ref, 3, n - 2, outI, outQ);
    for (let k = 3; k < n - 2; k++) {
      const a = record[k]!, b = record[n + k]!;
      // (a + ib)(cos φ − i sin φ) = (a cos φ + b sin φ) + i(b cos φ − a sin φ)
      expect(outI[k]).toBeCloseTo(a * Math.cos(phi) + b * Math.sin(phi), 14);
      expect(outQ[k]).toBeCloseTo(b * Math.cos(phi) - a * Math.sin(phi), 14);
    }
    expect(outI[0]).toBe(0);
  });
});

describe('where noise enters an I and Q record', () => {
  const scenario = (re0: number, im0: number, re1: number, im1: number) => {
    const s = twoStateScenario({ carrier: 'baseband-iq', recordLength: 1e-6 });
    s.signal.gain = 1.5;
    s.states[0]!.level = { re: re0, im: im0 };
    s.states[1]!.level = { re: re1, im: im1 };
    return s;
  };

  it('sensor-side noise along the outcome separation, with the gain', () => {
    const point = compilePoint(scenario(0.2, 0.1, -0.4, 0.9));
    const n = point.grid.samples;
    // separation (−0.6, 0.8): |Δ| = 1, so cos α = −0.6, sin α = 0.8
    const w = point.noise.sensorWeight;
    expect(w.length).toBe(2 * n);
    for (const k of [0, 17, n - 1]) {
      expect(w[k]).toBeCloseTo(1.5 * -0.6, 14);
      expect(w[n + k]).toBeCloseTo(1.5 * 0.8, 14);
    }
    expect(point.noise.realisations.sensor).toHaveLength(1);
    expect(point.noise.realisations.sensor[0]!.channels).toEqual([0, 1]);
  });

  it('amplifier-side noise: one realisation per channel, each entering its own channel with the gain, the second from the second lane', () => {
    const point = compilePoint(scenario(0, 0, 1, 1));
    const n = point.grid.samples;
    const amp = point.noise.realisations.amplifier;
    expect(amp.map((r) => [r.channels, r.lane])).toEqual([[[0], 0], [[1], 1]]);
    expect(amp[0]!.weight[3]).toBe(1.5);
    expect(amp[0]!.weight[n + 3]).toBe(0);
    expect(amp[1]!.weight[3]).toBe(0);
    expect(amp[1]!.weight[n + 3]).toBe(1.5);
    // what a realisation sees of a channel-major kernel: its own channel's kernel times the gain
    const kernel = Float64Array.from({ length: 2 * n }, (_, k) => k + 1);
    const seen = seenThrough(amp[1]!, kernel, 2, 9, n);
    for (let k = 2; k < 9; k++) expect(seen[k]).toBe(1.5 * (n + k + 1));
    expect(seen[1]).toBe(0);
  });

  it('one channel keeps one realisation of each (the carrier\'s rule)', () => {
    const point = compilePoint(twoStateScenario({ carrier: 'sine', recordLength: 1e-6 }));
    expect(point.channels).toBe(1);
    expect(point.noise.realisations.sensor).toHaveLength(1);
    expect(point.noise.realisations.amplifier).toHaveLength(1);
    expect(point.noise.realisations.sensor[0]!.weight).toBe(point.noise.sensorWeight);
  });
});

describe('the analog response on I and Q', () => {
  it('is the first-order response of Re(L) and Im(L), channel by channel, across a jump', () => {
    const s = twoStateScenario({ carrier: 'baseband-iq', recordLength: 2e-6, sampleRate: 50e6 });
    s.states[0]!.level = { re: 0.3, im: -0.2 };
    s.states[1]!.level = { re: -0.5, im: 0.7 };
    s.signal.gain = 2;
    const tau = 0.15e-6;
    s.signal.response = { timeConstant: tau, from: 'zero' };
    const point = compilePoint(s);
    const n = point.grid.samples, fs = point.grid.sampleRate;
    const path = makePathBuffer();
    const tJump = 0.71e-6;
    path.times[0] = tJump; path.entered[0] = 0; path.jumps = 1;
    const out = new Float64Array(2 * n);
    for (let c = 0; c < 2; c++) writeRespondedSignal(out, 0, n, point.levelWaves, point.noise.response!, 1, path, fs, c * n);
    const jumpSample = Math.ceil(tJump * fs);
    const part = (l: { re: number; im: number }, c: number) => (c === 0 ? l.re : l.im);
    for (let c = 0; c < 2; c++) {
      const before = part(s.states[1]!.level, c), after = part(s.states[0]!.level, c);
      const atJump = before * (1 - Math.exp(-tJump / tau));
      for (let k = 0; k < n; k++) {
        const t = k / fs;
        const y = k < jumpSample ? before * (1 - Math.exp(-t / tau)) : after + (atJump - after) * Math.exp(-(t - tJump) / tau);
        expect(out[c * n + k], `channel ${c}, sample ${k}`).toBeCloseTo(2 * y, 12);
      }
    }
  });
});
