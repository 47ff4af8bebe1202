/**
 * The WebAssembly record kernel (engine/wasm/record-loops.ts) gives the numbers of the TypeScript
 * loops it replaces in the trace engine, to the bit: white noise onto a waveform or onto the
 * record (RandomStream.addNormalsOnto / addNormals, ziggurat rejections included, the same
 * stream state after), and the dot products with a pipeline's kernels (dotRange, dotRangePair),
 * over even and odd ranges. And the compiled module in the repository is that of its
 * templates (engine/wasm/source: generated and compiled again here with wabt). Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { makeStream } from '../../src/random/streams.ts';
import { dotRange, dotRangePair } from '../../src/dsp/integrate.ts';
import { makeRecordLoops, RecordKernel, TypeScriptRecordLoops } from '../../src/engine/wasm/record-loops.ts';
import { WASM_BYTES } from '../../src/engine/wasm/kernels-wasm.ts';
import { compileWat } from '../../scripts/wasm-source.ts';
import { instantiateKernels } from '../../src/engine/wasm/memory.ts';
import { kernelsWat } from '../../src/engine/wasm/source/module.ts';

function wave(n: number, seed: number): Float64Array {
  const s = makeStream(seed, 0, 'calibrate', 0), w = new Float64Array(n);
  for (let i = 0; i < n; i++) w[i] = 3 * s.nextDouble() - 1;
  return w;
}

function sameBits(a: Float64Array, b: Float64Array, what: string): void {
  let differ = 0, first = -1;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) { differ++; if (first < 0) first = i; }
  expect(differ, `${what}: first difference at ${first} (${a[first]} vs ${b[first]})`).toBe(0);
}

describe('record kernel (WebAssembly)', () => {
  it('the module in the repository is the compiled text of the templates (run `npm run build:wasm` after editing them)', async () => {
    const bytes = await compileWat('kernels.wat', kernelsWat());
    expect(Buffer.from(bytes).equals(Buffer.from(WASM_BYTES))).toBe(true);
  });

  it('noise onto a waveform: 600 records of 1999 samples (~1.2 M normals, ~14 k rejections) equal addNormalsOnto, state included', () => {
    const n = 1999, waves = [wave(n, 1), wave(n, 2)];
    const kernel = new RecordKernel(n, waves, []);
    const a = makeStream(7, 3, 'score', 11), b = makeStream(7, 3, 'score', 11);
    const ours = new Float64Array(n);
    for (let shot = 0; shot < 600; shot++) {
      const lo = shot % 3, hi = n - (shot % 5), w = shot % 2;
      kernel.noiseOntoWaveform(a, w, lo, hi, 0.5 + shot / 100);
      ours.fill(0);
      b.addNormalsOnto(ours, waves[w]!, lo, hi - lo, 0.5 + shot / 100);
      sameBits(kernel.record.subarray(lo, hi), ours.subarray(lo, hi), `shot ${shot}`);
      expect(Array.from(a.state())).toEqual(Array.from(b.state()));
    }
  });

  it("the ziggurat's wedge test decides y < Math.exp(t) as Math.exp would, at the edge and away from it (2.2 M cases)", () => {
    // source/ziggurat.ts $below decides most cases from an estimate of exp within 1e-10; cases within
    // 1e-9 of it must call exp. y at exp(t) itself, one ulp either side, 1e-12, 5e-10 and 2e-9
    // away, and at random around it
    const below = instantiateKernels(0).exports.below as (y: number, t: number) => number;
    const s = makeStream(1, 0, 'aux', 0);
    let wrong = 0, first = '';
    for (let i = 0; i < 200_000; i++) {
      const t = i === 0 ? 0 : i === 1 ? -5.9375 : i === 2 ? -6.5 : -s.nextDouble() * 6.5;
      const e = Math.exp(t);
      for (const y of [e, e * (1 + 2 ** -52), e * (1 - 2 ** -53), e * (1 + 1e-12), e * (1 - 1e-12), e * (1 + 5e-10), e * (1 - 5e-10),
        e * (1 + 2e-9), e * (1 - 2e-9), e * (1 - 1e-10), e * (0.9 + 0.2 * s.nextDouble())]) {
        if (below(y, t) !== +(y < e)) { wrong++; first ||= `t = ${t}, y = ${y}`; }
      }
    }
    expect(wrong, first).toBe(0);
  });

  it('noise added onto the record in place equals addNormals, and σ = 0 draws nothing', () => {
    const n = 4096, kernel = new RecordKernel(n, [wave(n, 3)], []);
    const a = makeStream(8, 0, 'score', 0), b = makeStream(8, 0, 'score', 0);
    const start = wave(n, 4);
    kernel.record.set(start);
    const ours = Float64Array.from(start);
    for (let r = 0; r < 20; r++) {
      kernel.addNoise(a, 5 + r, n - r, 2);
      b.addNormals(ours, 5 + r, n - r - 5 - r, 2);
    }
    sameBits(kernel.record, ours, 'record');
    const before = Array.from(a.state());
    kernel.addNoise(a, 0, n, 0);
    expect(Array.from(a.state())).toEqual(before);
  });

  it.each([[0, 2000], [1, 2000], [3, 1000], [0, 1], [7, 8]])('dot products over [%i, %i) equal dotRange and dotRangePair', (lo, hi) => {
    const n = 2000, ki = wave(n, 5), kq = wave(n, 6);
    const kernel = new RecordKernel(n, [], [{ inPhase: ki, quadrature: kq, lo, hi }, { inPhase: kq, quadrature: null, lo, hi }]);
    kernel.record.set(wave(n, 9));
    const out = new Float64Array(2), pair = new Float64Array(2);
    kernel.values(0, out);
    dotRangePair(ki, kq, kernel.record, lo, hi, pair);
    expect([Object.is(out[0], pair[0]), Object.is(out[1], pair[1])]).toEqual([true, true]);
    kernel.values(1, out);
    expect(Object.is(out[0], dotRange(kq, kernel.record, lo, hi))).toBe(true);
    expect(out[1]).toBe(0);
  });

  it('a record of two channels (baseband I and Q): each channel\'s dot products summed, channel 0 first, in both loops', () => {
    const n = 700, lo = 11, hi = 650;
    const pipes = [{ inPhase: wave(2 * n, 21), quadrature: wave(2 * n, 22), lo, hi }, { inPhase: wave(2 * n, 23), quadrature: null, lo, hi }];
    const wasm = makeRecordLoops(n, [], pipes, undefined, 2), ts = makeRecordLoops(n, [], pipes, 0, 2);
    expect(wasm).toBeInstanceOf(RecordKernel);
    expect(wasm.record.length).toBe(2 * n);
    wasm.record.set(wave(2 * n, 24));
    ts.record.set(wasm.record);
    const x = new Float64Array(2), y = new Float64Array(2), first = new Float64Array(2), second = new Float64Array(2);
    for (let p = 0; p < 2; p++) {
      wasm.values(p, x);
      ts.values(p, y);
      expect([Object.is(x[0], y[0]), Object.is(x[1], y[1])], `pipeline ${p}`).toEqual([true, true]);
    }
    dotRangePair(pipes[0]!.inPhase, pipes[0]!.quadrature!, wasm.record, lo, hi, first);
    dotRangePair(pipes[0]!.inPhase, pipes[0]!.quadrature!, wasm.record, n + lo, n + hi, second);
    wasm.values(0, x);
    expect([Object.is(x[0], first[0]! + second[0]!), Object.is(x[1], first[1]! + second[1]!)]).toEqual([true, true]);
  });

  it('past the size limit the TypeScript loops serve instead, with the same records and values', () => {
    const n = 1501, waves = [wave(n, 10), wave(n, 11), wave(n, 12)];
    const pipes = [{ inPhase: wave(n, 13), quadrature: wave(n, 14), lo: 3, hi: 1400 }, { inPhase: wave(n, 15), quadrature: null, lo: 0, hi: n }];
    const wasm = makeRecordLoops(n, waves, pipes), ts = makeRecordLoops(n, waves, pipes, 0);
    expect(wasm).toBeInstanceOf(RecordKernel);
    expect(ts).toBeInstanceOf(TypeScriptRecordLoops);
    const a = makeStream(9, 1, 'score', 2), b = makeStream(9, 1, 'score', 2);
    const x = new Float64Array(2), y = new Float64Array(2);
    for (let shot = 0; shot < 200; shot++) {
      const w = shot % 3, lo = shot % 4, hi = n - (shot % 7);
      wasm.noiseOntoWaveform(a, w, lo, hi, 1.5);
      ts.noiseOntoWaveform(b, w, lo, hi, 1.5);
      wasm.addNoise(a, 0, lo + 10, 0.25);
      ts.addNoise(b, 0, lo + 10, 0.25);
      sameBits(wasm.record.subarray(0, hi), ts.record.subarray(0, hi), `shot ${shot}`);
      for (let p = 0; p < 2; p++) {
        wasm.values(p, x);
        ts.values(p, y);
        expect([Object.is(x[0], y[0]), Object.is(x[1], y[1])], `shot ${shot}, pipeline ${p}`).toEqual([true, true]);
      }
    }
    expect(Array.from(a.state())).toEqual(Array.from(b.state()));
  });
});
