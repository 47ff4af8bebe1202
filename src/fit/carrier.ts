/**
 * Finding the carrier of real records: the frequency of the strongest narrow line in their
 * averaged spectrum, refined by least squares, and its shape.
 *
 * Found: the averaged periodogram (Welch segments of whole records, analysis/welch.ts) has a
 * bin that stands above the median of its neighbours on BOTH sides (so the rising edge of 1/f
 * noise is not taken for a line) by at least LINE_RATIO and by eight standard errors of an
 * averaged bin, 1/√K for K segments (a chance rise that high is below 1e−9 per bin for any
 * usable K). Lines below MIN_LINE_BIN bins (fewer than a few cycles per segment) cannot be told
 * from slow noise and are not looked for.
 *
 * Refined: every record r is a tone of its own amplitude and phase (the two levels differ) at one
 * common frequency in noise. Least squares over the frequency, the amplitudes and the phases
 * reduces to maximising P(f) = Σ_r |Σ_k x_rk e^(−i2πfk/fs)|² (each record's mean removed; the
 * image term at −f is neglected, good for a few cycles per record and more) — the periodogram
 * maximiser of Rife & Boorstyn, IEEE Trans. Inf. Theory 20, 591 (1974), summed over records. A
 * grid over ±1 Welch bin finds the main lobe, golden-section search refines it.
 *
 * Standard error: the Cramér–Rao bound of a real tone's frequency, var(ω) = 24σ²/(A²N(N² − 1))
 * per record of N samples (Kay, Fundamentals of Statistical Signal Processing I (1993),
 * Example 3.14, η = A²/2σ²), whose Fisher information adds over records: 24σ²/(N(N² − 1)ΣA_r²);
 * σ² is the per-sample variance left after each record's tone, treated as white.
 *
 * Shape: a square carrier sign(cos θ) has a third harmonic of exactly 1/3 the fundamental
 * (its Fourier series); a sine has none. The ratio of the noise-corrected powers at 3f and f
 * decides (square when the amplitude ratio lies in [0.2, 0.5]; common practice, no source).
 */
import { makeWelchSegmenter, welchFromSums } from '../analysis/welch.ts';

/** A line must stand at least this many times above its neighbours' median (common practice, no source). */
export const LINE_RATIO = 2;
/** The lowest bin searched for a line. */
const MIN_LINE_BIN = 4;

/** The carrier found in, or checked against, the records. */
export interface CarrierFit {
  frequency: number;
  /** Standard error of the frequency (Hz); 0 when the frequency was given. */
  standardError: number;
  shape: 'sine' | 'square';
  /** Height of the line above its neighbours (NaN when the frequency was given). */
  lineRatio: number;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length === 0 ? NaN : s.length % 2 ? s[h]! : 0.5 * (s[h - 1]! + s[h]!);
}

/** Largest power of two ≤ n. */
function powerOfTwoBelow(n: number): number {
  let p = 1;
  while (p * 2 <= n) p *= 2;
  return p;
}

/** The strongest line of the records' averaged spectrum, or null (frequency in Hz, and its height). */
export function strongestLine(records: Float64Array, rows: number, samples: number, sampleRate: number): { frequency: number; ratio: number } | null {
  const length = powerOfTwoBelow(samples);
  if (length < 16) return null;
  const segmenter = makeWelchSegmenter(length);
  const sums = new Float64Array(length / 2 + 1);
  let segments = 0;
  for (let r = 0; r < rows; r++) segments += segmenter.addStretch(records, r * samples, (r + 1) * samples, sums);
  const { density, frequencies } = welchFromSums(sums, segments, sampleRate, segmenter);
  const half = length / 2;
  const needed = Math.max(LINE_RATIO, 1 + 8 / Math.sqrt(segments));
  let best: { frequency: number; ratio: number; power: number } | null = null;
  for (let k = MIN_LINE_BIN; k <= half - 3; k++) {
    const left: number[] = [], right: number[] = [];
    for (let j = Math.max(2, k - 10); j <= k - 3; j++) left.push(density[j]!);
    for (let j = k + 3; j <= Math.min(half, k + 10); j++) right.push(density[j]!);
    const ratio = density[k]! / Math.max(median(left), median(right));
    if (ratio >= needed && (!best || density[k]! > best.power)) best = { frequency: frequencies[k]!, ratio, power: density[k]! };
  }
  return best && { frequency: best.frequency, ratio: best.ratio };
}

/** Per-record tone amplitudes at frequency f: writes Σ_k x_k cos, Σ_k x_k sin (record means removed) into re/im. */
function tones(records: Float64Array, rows: number, samples: number, sampleRate: number, f: number, re: Float64Array, im: Float64Array, means: Float64Array): void {
  const cos = new Float64Array(samples), sin = new Float64Array(samples);
  const w = (2 * Math.PI * f) / sampleRate;
  for (let k = 0; k < samples; k++) { cos[k] = Math.cos(w * k); sin[k] = Math.sin(w * k); }
  for (let r = 0; r < rows; r++) {
    const base = r * samples, mean = means[r]!;
    let a = 0, b = 0;
    for (let k = 0; k < samples; k++) {
      const x = records[base + k]! - mean;
      a += x * cos[k]!;
      b += x * sin[k]!;
    }
    re[r] = a;
    im[r] = b;
  }
}

function rowMeans(records: Float64Array, rows: number, samples: number): Float64Array {
  const means = new Float64Array(rows);
  for (let r = 0; r < rows; r++) {
    let s = 0;
    for (let k = 0; k < samples; k++) s += records[r * samples + k]!;
    means[r] = s / samples;
  }
  return means;
}

/** The least-squares frequency near `guess` (within ±halfWidth) and its standard error (see the file comment). */
export function refineFrequency(
  records: Float64Array, rows: number, samples: number, sampleRate: number, guess: number, halfWidth: number,
): { frequency: number; standardError: number } {
  const means = rowMeans(records, rows, samples);
  const re = new Float64Array(rows), im = new Float64Array(rows);
  const power = (f: number) => {
    tones(records, rows, samples, sampleRate, f, re, im, means);
    let p = 0;
    for (let r = 0; r < rows; r++) p += re[r]! * re[r]! + im[r]! * im[r]!;
    return p;
  };
  const grid = 40;
  let bestF = guess, bestP = -Infinity;
  const step = (2 * halfWidth) / grid;
  for (let i = 0; i <= grid; i++) {
    const f = guess - halfWidth + i * step;
    const p = power(f);
    if (p > bestP) { bestP = p; bestF = f; }
  }
  // golden section on the grid cell either side of the best point
  const golden = (Math.sqrt(5) - 1) / 2;
  let a = bestF - step, b = bestF + step;
  let c = b - golden * (b - a), d = a + golden * (b - a);
  let pc = power(c), pd = power(d);
  for (let i = 0; i < 60 && b - a > 1e-12 * sampleRate; i++) {
    if (pc > pd) { b = d; d = c; pd = pc; c = b - golden * (b - a); pc = power(c); }
    else { a = c; c = d; pc = pd; d = a + golden * (b - a); pd = power(d); }
  }
  const frequency = 0.5 * (a + b);
  // Cramér–Rao: amplitudes A_r = 2|X_r|/N, σ² from what each record's tone leaves
  tones(records, rows, samples, sampleRate, frequency, re, im, means);
  let amplitudes = 0, residual = 0;
  for (let r = 0; r < rows; r++) {
    const x2 = re[r]! * re[r]! + im[r]! * im[r]!;
    amplitudes += (4 * x2) / (samples * samples);
    let energy = 0;
    for (let k = 0; k < samples; k++) energy += (records[r * samples + k]! - means[r]!) ** 2;
    residual += energy - (2 * x2) / samples;
  }
  const variance = residual / (rows * (samples - 3));
  const omegaVariance = (24 * variance) / (samples * (samples * samples - 1) * amplitudes);
  return { frequency, standardError: (Math.sqrt(omegaVariance) * sampleRate) / (2 * Math.PI) };
}

/** 'square' when the records' third harmonic is a third of the fundamental, else 'sine' (see the file comment). */
export function carrierShape(records: Float64Array, rows: number, samples: number, sampleRate: number, frequency: number): 'sine' | 'square' {
  if (3 * frequency >= sampleRate / 2) return 'sine';
  const means = rowMeans(records, rows, samples);
  const re = new Float64Array(rows), im = new Float64Array(rows);
  const powerAt = (f: number) => {
    tones(records, rows, samples, sampleRate, f, re, im, means);
    let p = 0;
    for (let r = 0; r < rows; r++) p += re[r]! * re[r]! + im[r]! * im[r]!;
    return p;
  };
  const fundamental = powerAt(frequency), third = powerAt(3 * frequency);
  // noise adds about N·σ²/2 per record to each |X|²; take it from the power between the two
  const noise = powerAt(2 * frequency + 0.5 * sampleRate / samples);
  const ratio = Math.sqrt(Math.max(0, third - noise) / Math.max(1e-300, fundamental - noise));
  return ratio >= 0.2 && ratio <= 0.5 ? 'square' : 'sine';
}

/** The carrier of real records held in memory: found (null when no line stands out), or checked at a given frequency. */
export function fitCarrier(records: Float64Array, rows: number, samples: number, sampleRate: number, given: number | null): CarrierFit | null {
  if (given !== null) {
    return { frequency: given, standardError: 0, shape: carrierShape(records, rows, samples, sampleRate, given), lineRatio: NaN };
  }
  const line = strongestLine(records, rows, samples, sampleRate);
  if (!line) return null;
  const bin = sampleRate / powerOfTwoBelow(samples);
  const refined = refineFrequency(records, rows, samples, sampleRate, line.frequency, bin);
  return { ...refined, shape: carrierShape(records, rows, samples, sampleRate, refined.frequency), lineRatio: line.ratio };
}
