/**
 * The noise spectrum of recorded traces, for the report: each labelled outcome's records (up to
 * SPECTRUM_RECORDS of them) less that outcome's mean record, through Welch's method
 * (analysis/welch.ts; Hann window, 50 % overlap, one-sided density) with the longest power-of-two
 * segment the record holds, averaged over the records (and over I and Q for complex records).
 * What is left after the mean record is the noise, and the state changes of the records that
 * changed state (a relaxation shows as a Lorentzian-like excess at low frequency).
 */
import { welchDensity } from '../../analysis/welch.ts';
import type { RecordRows } from './batch.ts';

/** Records per outcome the spectrum averages. */
export const SPECTRUM_RECORDS = 256;

/** One density per group of records ("labelled 0", …, or all records without labels). */
export interface RecordsSpectrum {
  frequencies: Float64Array;
  /** Per group: its outcome index (null: every record, unlabelled) and its density in unit²/Hz. */
  groups: { outcome: number | null; records: number; density: Float64Array }[];
}

/** The spectrum of `source` (null when a record is shorter than 8 samples). */
export function recordsSpectrum(source: RecordRows & { rows: number }, labels: Uint8Array | null, sampleRate: number): RecordsSpectrum | null {
  const n = source.samples;
  if (n < 8) return null;
  const segment = 2 ** Math.floor(Math.log2(n));
  const wanted = labels ? [0, 1] : [null];
  const i = new Float64Array(n), q = source.complex ? new Float64Array(n) : null;
  let frequencies: Float64Array | null = null;
  const groups: RecordsSpectrum['groups'] = [];
  for (const outcome of wanted) {
    const rows: number[] = [];
    for (let r = 0; r < source.rows && rows.length < SPECTRUM_RECORDS; r++) if (outcome === null || labels![r] === outcome) rows.push(r);
    if (rows.length < 2) continue;
    const channels = q ? 2 : 1;
    // the mean record of the group, per channel
    const mean = new Float64Array(channels * n);
    for (const r of rows) {
      source.row(r, i, q);
      for (let k = 0; k < n; k++) {
        mean[k]! += i[k]! / rows.length;
        if (q) mean[n + k]! += q[k]! / rows.length;
      }
    }
    let density: Float64Array | null = null;
    const residual = new Float64Array(n);
    for (const r of rows) {
      source.row(r, i, q);
      for (let c = 0; c < channels; c++) {
        const x = c === 0 ? i : q!;
        for (let k = 0; k < n; k++) residual[k] = x[k]! - mean[c * n + k]!;
        const w = welchDensity(residual, sampleRate, { segmentLength: segment });
        frequencies ??= w.frequencies;
        density ??= new Float64Array(w.density.length);
        for (let k = 0; k < density.length; k++) density[k]! += w.density[k]! / (rows.length * channels);
      }
    }
    groups.push({ outcome, records: rows.length, density: density! });
  }
  return frequencies && groups.length > 0 ? { frequencies, groups } : null;
}
