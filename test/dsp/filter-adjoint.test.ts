/**
 * applyFilterAdjoint is the transpose of filtering from rest on a finite stretch: the
 * dot-product test ⟨u, H·x⟩ = ⟨Hᵀ·u, x⟩ for random u, x (common practice for adjoint operators,
 * no source), to 1e−12 of Σ|terms|, for every filter kind; and it may work in place.
 */
import { describe, expect, it } from 'vitest';
import { applyFilterAdjoint, designFilter, type FilterSpec } from '../../src/dsp/filter-spec.ts';
import { xorshiftRecord } from './helpers.ts';

const fs = 1e6;
const specs: { name: string; spec: FilterSpec }[] = [
  { name: 'none', spec: { kind: 'none' } },
  { name: 'boxcar 7', spec: { kind: 'boxcar', length: 7 } },
  { name: 'single-pole 30 kHz', spec: { kind: 'single-pole', cutoff: 30e3 } },
  { name: 'Butterworth 2 at 100 kHz', spec: { kind: 'butterworth', order: 2, cutoff: 100e3 } },
  { name: 'Butterworth 7 at 20 kHz', spec: { kind: 'butterworth', order: 7, cutoff: 20e3 } },
  { name: 'FIR 33 Hann at 80 kHz', spec: { kind: 'fir', taps: 33, cutoff: 80e3, window: 'hann' } },
];

describe('filter adjoint: ⟨u, Hx⟩ = ⟨Hᵀu, x⟩', () => {
  it.each(specs)('$name', ({ spec }) => {
    const filter = designFilter(spec, fs);
    const n = 300;
    for (const seed of [3, 4]) {
      const x = xorshiftRecord(seed, n), u = xorshiftRecord(seed + 100, n);
      const hx = filter.apply(x, new Float64Array(n), filter.makeState());
      const htu = applyFilterAdjoint(filter, u, new Float64Array(n), filter.makeState());
      let left = 0, right = 0, scale = 0;
      for (let k = 0; k < n; k++) {
        left += u[k]! * hx[k]!;
        right += htu[k]! * x[k]!;
        scale += Math.abs(u[k]! * hx[k]!) + Math.abs(htu[k]! * x[k]!);
      }
      expect(Math.abs(left - right), `seed ${seed}: ⟨u,Hx⟩ ${left}, ⟨Hᵀu,x⟩ ${right}, tol ${1e-12 * scale}`).toBeLessThanOrEqual(1e-12 * scale);
      const inPlace = Float64Array.from(u);
      applyFilterAdjoint(filter, inPlace, inPlace, filter.makeState());
      expect(Array.from(inPlace)).toEqual(Array.from(htu));
    }
  });
});
