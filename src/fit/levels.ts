/**
 * The two levels in the twin's frame, with standard errors from the bootstrap over groups of
 * records (estimate.ts). Which state is which: at baseband the lower value is 'lower'; with a
 * carrier or I/Q the smaller magnitude. The frame: a common phase of all levels is a carrier
 * phase no record can tell, so the levels are turned by χ = arg(L_upper − L_lower) to put the
 * separation along the real axis, where the twin's sensor-side noise acts (signal/noise-plan.ts:
 * it is modulated like a real level change). At baseband χ = 0.
 */
import type { RandomStream } from '../random/stream.ts';
import { drawGroupCounts, spread, type Estimate } from './estimate.ts';
import { levelsFrom } from './posteriors.ts';

type Level = { re: number; im: number };

/** The levels of the model's two states, ordered and turned. */
export interface TwinLevels {
  /** Model state of the lower and the upper level. */
  lower: number;
  upper: number;
  /** χ (rad). */
  rotation: number;
  /** Levels as measured (model state order). */
  measured: [Level, Level];
  /** Turned levels in model state order, with errors. */
  re: [Estimate, Estimate];
  im: [Estimate, Estimate];
  /** Standard error of χ. */
  rotationError: number;
}

function arrange(levels: [Level, Level], baseband: boolean): { lower: number; upper: number; rotation: number } {
  const size = (l: Level) => (baseband ? l.re : Math.hypot(l.re, l.im));
  const lower = size(levels[0]) <= size(levels[1]) ? 0 : 1, upper = 1 - lower;
  const rotation = baseband ? 0 : Math.atan2(levels[upper]!.im - levels[lower]!.im, levels[upper]!.re - levels[lower]!.re);
  return { lower, upper, rotation };
}

const turn = (l: Level, angle: number): Level => ({ re: l.re * Math.cos(angle) + l.im * Math.sin(angle), im: l.im * Math.cos(angle) - l.re * Math.sin(angle) });

/** The levels from the group sums of readRecords (see the file comment). */
export function twinLevels(levelSums: Float64Array, baseband: boolean, stream: RandomStream, resamples: number): TwinLevels {
  const measured = levelsFrom(levelSums, null);
  const { lower, upper, rotation } = arrange(measured, baseband);
  const counts = new Float64Array(levelSums.length / 6);
  const draws: { levels: [Level, Level]; rotation: number }[] = [];
  for (let b = 0; b < resamples; b++) {
    drawGroupCounts(stream, counts);
    const again = levelsFrom(levelSums, counts);
    const angle = baseband ? 0 : Math.atan2(again[upper]!.im - again[lower]!.im, again[upper]!.re - again[lower]!.re);
    draws.push({ levels: [turn(again[0]!, angle), turn(again[1]!, angle)], rotation: angle });
  }
  const est = (s: number, part: 're' | 'im'): Estimate => ({
    value: turn(measured[s]!, rotation)[part],
    standardError: spread(draws.map((d) => d.levels[s]![part])),
  });
  // χ wraps at ±π: its spread is taken about the full-data value
  const rotationError = spread(draws.map((d) => rotation + Math.atan2(Math.sin(d.rotation - rotation), Math.cos(d.rotation - rotation))));
  return { lower, upper, rotation, measured, re: [est(0, 're'), est(1, 're')], im: [est(0, 'im'), est(1, 'im')], rotationError };
}
