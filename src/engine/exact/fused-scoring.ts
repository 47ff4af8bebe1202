/**
 * What the fused exact path (fused.ts) needs to score a point: per pipeline, the projection
 * axis, the threshold rule, the band and the window's last sample, as plain data (it crosses to
 * worker threads).
 */
import type { CompiledPoint } from '../compile-point.ts';
import type { PipelineCalibration } from '../../classify/calibrate.ts';
import { classifierOf } from '../../classify/registry.ts';

/** How one pipeline scores in the fused path (plain data: it crosses to worker threads). */
export interface FusedPipeline {
  cos: number;
  sin: number;
  threshold: number;
  highIsOne: boolean;
  /** Half-width of the ambiguous band, or −1 when the pipeline has no band. */
  band: number;
  /** Time of the pipeline's last sample when it ends before the timing window, else null. */
  lastSample: number | null;
}

/** The scoring of every pipeline of a point, for `simulateTalliedBatch`. */
export interface FusedScoring {
  pipelines: FusedPipeline[];
}

/**
 * The fused scoring of a calibrated point, or null when a pipeline decides other than by a
 * threshold on its projected value (a classifier that reads bins, calibrated weights).
 */
export function fusedScoring(point: CompiledPoint, calibrations: readonly PipelineCalibration[]): FusedScoring | null {
  if (point.pipelines.some((p) => classifierOf(p.spec).readsBins) || calibrations.some((c) => c.weights !== null)) return null;
  const fs = point.grid.sampleRate;
  return {
    pipelines: calibrations.map((c, p) => {
      const chain = point.pipelines[p]!.chain;
      return {
        cos: c.axis.cos, sin: c.axis.sin, threshold: c.rule.threshold, highIsOne: c.rule.highIsOne,
        band: chain.band !== null ? c.bandHalfWidth : -1,
        lastSample: chain.processHi !== point.grid.windowHi ? (chain.processHi - 1) / fs : null,
      };
    }),
  };
}
