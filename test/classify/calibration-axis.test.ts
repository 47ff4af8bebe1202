/**
 * The decision axis of a pipeline: along the calibrated state separation with
 * `referencePhase: auto`, and the I axis of the reference when the phase is fixed (README,
 * processing keys) — the same axis `analyze` uses without a calibration. Geometry of the
 * demodulated separation: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { runPoints } from '../../src/run/run-points.ts';
import { twoStateScenario } from '../support/scenarios.ts';
import type { Scenario } from '../../src/scenario/types.ts';

function withCarrierPhase(referencePhase: number | 'auto'): Scenario {
  const s = twoStateScenario({ shots: 1024, recordLength: 2e-6, sampleRate: 20e6, carrierFrequency: 2e6 });
  return {
    ...s,
    signal: { ...s.signal, carrier: { ...s.signal.carrier, phase: (40 * Math.PI) / 180 } },
    pipelines: [{ ...s.pipelines[0]!, referencePhase }],
  };
}

describe('calibration axis', () => {
  it('is the I axis of the reference for a fixed referencePhase', async () => {
    const r = await runPoints([{ parameters: {}, scenario: withCarrierPhase(0) }], { engine: 'exact' });
    expect(r.points[0]!.calibrations[0]!.axis).toEqual({ cos: 1, sin: 0 });
  });

  it('is calibrated with referencePhase auto: near I (auto turns the reference along the separation) but not exactly I', async () => {
    const r = await runPoints([{ parameters: {}, scenario: withCarrierPhase('auto') }], { engine: 'exact' });
    const { cos, sin } = r.points[0]!.calibrations[0]!.axis;
    const angle = (Math.atan2(sin, cos) * 180) / Math.PI;
    expect(Math.abs(angle), `axis angle ${angle}°`).toBeLessThan(5);
    expect(sin).not.toBe(0);
  });

  it('with a fixed phase 40° off the separation, the I axis still (the user asked for that reference)', async () => {
    const r = await runPoints([{ parameters: {}, scenario: withCarrierPhase((80 * Math.PI) / 180) }], { engine: 'exact' });
    expect(r.points[0]!.calibrations[0]!.axis).toEqual({ cos: 1, sin: 0 });
  });
});
