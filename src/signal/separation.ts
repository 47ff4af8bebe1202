/**
 * Where the two outcomes lie in the level plane: each outcome's mean level under the prepared
 * mixture, and the angle of the separation from outcome 0's mean to outcome 1's. The 'auto'
 * reference phase puts this separation on the I axis; on baseband I and Q channels, sensor-side
 * noise moves the level along it (noise-plan.ts).
 */
import type { Complex, Scenario } from '../scenario/types.ts';

/** The mean level of each outcome group, weighted by the prepared mixture (a state prepared with weight 0 counts as 1e-300). */
export function outcomeMeans(scenario: Pick<Scenario, 'outcomes' | 'states' | 'prepare'>): Complex[] {
  return scenario.outcomes.map((_, o) => {
    let re = 0, im = 0, w = 0;
    scenario.states.forEach((s, i) => {
      if (s.outcome !== o) return;
      const p = scenario.prepare[i]! > 0 ? scenario.prepare[i]! : 1e-300;
      re += p * s.level.re; im += p * s.level.im; w += p;
    });
    return { re: re / w, im: im / w };
  });
}

/** The angle (rad) of the separation from outcome 0's mean level to outcome 1's (0 when they coincide). */
export function separationAngle(scenario: Pick<Scenario, 'outcomes' | 'states' | 'prepare'>): number {
  const [m0, m1] = outcomeMeans(scenario);
  return Math.atan2(m1!.im - m0!.im, m1!.re - m0!.re);
}
