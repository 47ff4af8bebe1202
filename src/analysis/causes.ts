/** Why a shot ended where it did. The simulator knows the truth, so each wrong shot gets one. */
export const CAUSES = ['none', 'noise', 'relaxation', 'excitation', 'leakage', 'preparation', 'mapping', 'discarded'] as const;

export const CAUSE_NONE = 0;
export const CAUSE_NOISE = 1;
export const CAUSE_RELAXATION = 2;
export const CAUSE_EXCITATION = 3;
export const CAUSE_LEAKAGE = 4;
export const CAUSE_PREPARATION = 5;
export const CAUSE_MAPPING = 6;
export const CAUSE_DISCARDED = 7;

/** Cause code for a transition kind. */
export function transitionCause(kind: 'relaxation' | 'excitation' | 'leakage'): number {
  return kind === 'relaxation' ? CAUSE_RELAXATION : kind === 'excitation' ? CAUSE_EXCITATION : CAUSE_LEAKAGE;
}

/**
 * The cause of a wrong shot, by precedence along the shot's history: a preparation error comes
 * first, then a mapping error, then the first jump of the chain before the window ends, and
 * otherwise noise alone.
 */
export function attributeCause(
  intended: number, prepared: number, initial: number, jumpedBeforeWindowEnd: boolean, firstJumpCause: number,
): number {
  if (prepared !== intended) return CAUSE_PREPARATION;
  if (initial !== prepared) return CAUSE_MAPPING;
  if (jumpedBeforeWindowEnd) return firstJumpCause;
  return CAUSE_NOISE;
}
