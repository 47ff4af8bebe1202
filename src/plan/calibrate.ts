/**
 * Calibration of each pipeline on its own shots (never the scored ones), as a lab does it
 * from shots of known preparation: the separation axis from the mean I/Q of each intended
 * outcome, then the threshold (midpoint of the projected means, count-minimising on the
 * calibration histograms, or fixed).
 */
import { midpointThreshold, optimalThreshold, type ThresholdRule } from '../classify/threshold.ts';
import { project, separationAxis, type Axis } from '../classify/project.ts';
import type { ShotBatch } from './batch.ts';
import type { CompiledPoint } from './compile.ts';

export interface PipelineCalibration {
  axis: Axis;
  rule: ThresholdRule;
  /** Mean projected value of the calibration shots of each intended outcome. */
  outcomeMeans: [number, number];
}

/** Calibrates every pipeline of a point from its calibration batches. */
export function calibrate(point: CompiledPoint, batches: readonly ShotBatch[]): PipelineCalibration[] {
  const outcomeOf = point.scenario.states.map((s) => s.outcome);
  return point.pipelines.map((pipeline, p) => {
    const sums = [[0, 0, 0], [0, 0, 0]] as [number, number, number][];
    for (const b of batches) {
      const v = b.values[p]!;
      for (let i = 0; i < b.count; i++) {
        const s = sums[outcomeOf[b.intended[i]!]!]!;
        s[0] += v.inPhase[i]!; s[1] += v.quadrature[i]!; s[2]++;
      }
    }
    const [g0, g1] = sums as [[number, number, number], [number, number, number]];
    if (g0[2] === 0 || g1[2] === 0) throw new Error('calibration needs shots prepared in both outcomes; raise calibrationShots or check prepare');
    const baseband = point.pipelines[p]!.kernels.quadrature === null;
    const axis = baseband ? { cos: 1, sin: 0 } : separationAxis(g0[0] / g0[2], g0[1] / g0[2], g1[0] / g1[2], g1[1] / g1[2]);
    const values: [number[], number[]] = [[], []];
    for (const b of batches) {
      const v = b.values[p]!;
      const projected = project(v.inPhase, v.quadrature, axis, new Float64Array(b.count));
      for (let i = 0; i < b.count; i++) values[outcomeOf[b.intended[i]!]!]!.push(projected[i]!);
    }
    const m0 = values[0].reduce((a, x) => a + x, 0) / values[0].length;
    const m1 = values[1].reduce((a, x) => a + x, 0) / values[1].length;
    const { threshold } = pipeline.spec;
    let rule: ThresholdRule;
    if (threshold.method === 'midpoint') rule = midpointThreshold(m0, m1);
    else if (threshold.method === 'fixed') rule = { threshold: threshold.value, highIsOne: m1 >= m0 };
    else {
      const best = optimalThreshold(Float64Array.from(values[0]), Float64Array.from(values[1]));
      rule = { threshold: best.threshold, highIsOne: best.highIsOne };
    }
    return { axis, rule, outcomeMeans: [m0, m1] };
  });
}
