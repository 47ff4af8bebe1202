/**
 * The xoshiro128** step as WebAssembly text (random/xoshiro.ts nextInt32Of, step for step): ONE
 * template, from which every place in the module that steps a generator is emitted — on scalar
 * i32 words or on i32x4 vectors (four generators side by side), with the state in locals or in
 * memory, with or without its output.
 */

/** An instruction set for the step. */
export interface Isa {
  mul: string;
  xor: string;
  or: string;
  shl: string;
  shrU: string;
  /** The rotate: one instruction (i32.rotl), or null for shl | shr_u (SIMD has no rotate). */
  rotl: string | null;
  /** The constant c in this instruction set (a splat held in a local, for vectors). */
  constant(c: number): string;
}

/** Scalar 32-bit words. */
export const SCALAR: Isa = {
  mul: 'i32.mul', xor: 'i32.xor', or: 'i32.or', shl: 'i32.shl', shrU: 'i32.shr_u', rotl: 'i32.rotl',
  constant: (c) => `(i32.const ${c})`,
};

/** Four generators in the i32x4 lanes; the multipliers 5 and 9 in the locals $five and $nine. */
export const LANES: Isa = {
  mul: 'i32x4.mul', xor: 'v128.xor', or: 'v128.or', shl: 'i32x4.shl', shrU: 'i32x4.shr_u', rotl: null,
  constant: (c) => {
    if (c === 5) return '(local.get $five)';
    if (c === 9) return '(local.get $nine)';
    throw new Error(`no i32x4 constant ${c}`);
  },
};

/**
 * x rotated left by k. Without a rotate instruction x is read twice: `scratch` holds it when x
 * is not a plain local.get.
 */
export function rotate(isa: Isa, x: string, k: number, scratch?: string): string {
  if (isa.rotl) return `(${isa.rotl} ${x} (i32.const ${k}))`;
  let first = x, again = x;
  if (!/^\(local\.get \$\w+\)$/.test(x)) {
    if (!scratch) throw new Error('rotate: an expression needs a scratch local');
    first = `(local.tee ${scratch} ${x})`;
    again = `(local.get ${scratch})`;
  }
  return `(${isa.or} (${isa.shl} ${first} (i32.const ${k})) (${isa.shrU} ${again} (i32.const ${32 - k})))`;
}

export interface StepOptions {
  isa: Isa;
  /** The state's four words as locals (read; written back unless `store` is given). */
  words: readonly [string, string, string, string];
  /** The two temporaries. */
  temps: readonly [string, string];
  /** The state is in memory: the instruction that loads word j into its local, first. */
  load?: (j: number, into: string) => string;
  /** The instruction that writes word j's new value, when not into its local. */
  store?: (j: number, value: string) => string;
  /**
   * The output: a local set before the state moves, or 'value' (left as the sequence's value,
   * after the state's writes; needs `store`). None: the step's output is not used.
   */
  output?: string;
  /** A local for the output's rotate without a rotate instruction. */
  scratch?: string;
}

/** The xoshiro128** output of the state (computed from word 1 before the step). */
export function xoshiroOutput(isa: Isa, s1: string, scratch?: string): string {
  const five = `(${isa.mul} ${s1} ${isa.constant(5)})`;
  return `(${isa.mul} ${rotate(isa, five, 7, scratch)} ${isa.constant(9)})`;
}

/** One xoshiro128** step (see StepOptions): the instructions, one a line. */
export function xoshiroStep(o: StepOptions): string {
  const { isa, words, temps: [n2, n3] } = o;
  const get = (name: string): string => `(local.get ${name})`;
  const [s0, s1, s2, s3] = words.map(get) as [string, string, string, string];
  const lines: string[] = [];
  if (o.load) words.forEach((w, j) => lines.push(o.load!(j, w)));
  if (o.output !== undefined && o.output !== 'value') lines.push(`(local.set ${o.output} ${xoshiroOutput(isa, s1, o.scratch)})`);
  lines.push(`(local.set ${n2} (${isa.xor} ${s2} ${s0}))`, `(local.set ${n3} (${isa.xor} ${s3} ${s1}))`);
  const next = [
    `(${isa.xor} ${s0} ${get(n3)})`,
    `(${isa.xor} ${s1} ${get(n2)})`,
    `(${isa.xor} ${get(n2)} (${isa.shl} ${s1} (i32.const 9)))`,
    rotate(isa, get(n3), 11),
  ];
  // word 2 before word 1, whose old value it reads (the words may be the locals themselves)
  for (const j of [2, 1, 0, 3]) {
    lines.push(o.store ? o.store(j, next[j]!) : `(local.set ${words[j]} ${next[j]})`);
  }
  if (o.output === 'value') {
    if (!o.store) throw new Error("xoshiroStep: output 'value' needs the state in memory");
    lines.push(xoshiroOutput(isa, s1, o.scratch));
  }
  return lines.join('\n');
}

/** Scalar words in four locals, stepped in place. */
export function stepLocals(words: readonly [string, string, string, string], output?: string): string {
  return xoshiroStep({ isa: SCALAR, words, temps: ['$n2', '$n3'], output });
}

/**
 * $next: one step of the state at byte `st`, returning its output (RandomStream.nextInt32);
 * $uniform: the uniform in (0, 1) of the next output, as RandomStream.nextDouble.
 */
export function nextAndUniform(): string {
  const at = (j: number): string => (j === 0 ? '' : ` offset=${4 * j}`);
  return `
  ;; one xoshiro128** step on the state at byte \`st\`; returns the 32-bit output
  (func $next (param $st i32) (result i32)
    (local $s0 i32) (local $s1 i32) (local $s2 i32) (local $s3 i32) (local $n2 i32) (local $n3 i32)
    ${xoshiroStep({
      isa: SCALAR, words: ['$s0', '$s1', '$s2', '$s3'], temps: ['$n2', '$n3'], output: 'value',
      load: (j, into) => `(local.set ${into} (i32.load${at(j)} (local.get $st)))`,
      store: (j, value) => `(i32.store${at(j)} (local.get $st) ${value})`,
    })})

  ;; a uniform in (0, 1) from the next output, as RandomStream.nextDouble
  (func $uniform (param $st i32) (result f64)
    ${uniformOf('(call $next (local.get $st))')})
`;
}

/** The uniform (r + 0.5)·2^-32 of a 32-bit output r (unsigned), as RandomStream.nextDouble. */
export function uniformOf(r: string): string {
  return `(f64.mul (f64.add (f64.convert_i32_u ${r}) (f64.const 0.5)) (f64.const 0x1p-32))`;
}
