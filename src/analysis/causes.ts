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

/** A shot's state along its history, in the order the history is drawn. */
export type HistoryStage = 'intended' | 'prepared' | 'initial';

/** A rule's cause that is not a fixed code: the first jump's own cause. */
export const FIRST_JUMP_CAUSE = -1;

/** One rule of the precedence: when it holds, the shot's cause. */
export interface CauseRule {
  /** 'differs': the shot's `stage` state is not its `from` state; 'jumped': the chain jumped before the window ended. */
  readonly when: 'differs' | 'jumped';
  readonly stage?: HistoryStage;
  readonly from?: HistoryStage;
  /** A cause code, or FIRST_JUMP_CAUSE. */
  readonly cause: number;
}

/**
 * The precedence of causes for a wrong shot, along the shot's history: the first rule that
 * holds names the cause — a preparation error first, then a mapping error, then the first jump
 * of the chain before the window ends — and otherwise noise alone. The one statement of it:
 * `attributeCause` reads it, and the WebAssembly kernels' cause function is generated from it
 * (engine/wasm/source/causes.ts).
 */
export const CAUSE_PRECEDENCE: { readonly rules: readonly CauseRule[]; readonly otherwise: number } = {
  rules: [
    { when: 'differs', stage: 'prepared', from: 'intended', cause: CAUSE_PREPARATION },
    { when: 'differs', stage: 'initial', from: 'prepared', cause: CAUSE_MAPPING },
    { when: 'jumped', cause: FIRST_JUMP_CAUSE },
  ],
  otherwise: CAUSE_NOISE,
};

/** The history stages in drawing order; a rule's stages as indices into it, for attributeCause. */
const STAGES: readonly HistoryStage[] = ['intended', 'prepared', 'initial'];
/**
 * CAUSE_PRECEDENCE's rules with numbers in place of names (one shape, no string comparisons):
 * attributeCause runs once per wrong shot, and reading the rules by name cost twice as much.
 */
const RULES = CAUSE_PRECEDENCE.rules.map((r) => ({
  jumped: r.when === 'jumped', stage: STAGES.indexOf(r.stage ?? 'intended'), from: STAGES.indexOf(r.from ?? 'intended'), cause: r.cause,
}));

/** The cause of a wrong shot, by CAUSE_PRECEDENCE. */
export function attributeCause(
  intended: number, prepared: number, initial: number, jumpedBeforeWindowEnd: boolean, firstJumpCause: number,
): number {
  for (let k = 0; k < RULES.length; k++) {
    const r = RULES[k]!;
    const holds = r.jumped
      ? jumpedBeforeWindowEnd
      : (r.stage === 0 ? intended : r.stage === 1 ? prepared : initial) !== (r.from === 0 ? intended : r.from === 1 ? prepared : initial);
    if (holds) return r.cause === FIRST_JUMP_CAUSE ? firstJumpCause : r.cause;
  }
  return CAUSE_PRECEDENCE.otherwise;
}
