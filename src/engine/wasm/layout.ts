/**
 * The memory layout of the WebAssembly kernels: every address the module reads or writes below
 * its arrays is a named slot here, with its type and length. The WAT generator
 * (source/module.ts) and the TypeScript callers (memory.ts, record-loops.ts, exact/kernel.ts)
 * both take their offsets from this one definition, and the module exports each slot's offset
 * (slotExportName) so that a stale binary is caught at load (memory.ts checkLayout).
 *
 * To add a slot: add a line to SLOT_SPECS, use it by name on both sides (`L.at.name` in a
 * template; i32Slot, f64Slot or SlotWriter in TypeScript), and run `npm run build:wasm`.
 *
 * Slots are placed one after the other in the order listed, each aligned to its element size
 * (i32: 4, f64: 8, v128: 16 bytes), unless `at` pins it. The arrays (waveforms, kernels and
 * record; or prefix sums) start at the first page boundary after the last slot.
 */
import { CAUSES } from '../../analysis/causes.ts';

/** A slot's element type: i32 and f64 scalars, or v128 vectors (four i32 or two f64 lanes). */
export type SlotType = 'i32' | 'f64' | 'v128';

export interface SlotSpec {
  readonly name: string;
  readonly type: SlotType;
  /** Elements (vectors, for v128). */
  readonly length: number;
  /** A fixed byte offset instead of the next free one. */
  readonly at?: number;
}

export interface Slot extends SlotSpec {
  /** Byte offset. */
  readonly offset: number;
  /** Byte length. */
  readonly bytes: number;
}

const ELEMENT_BYTES: Record<SlotType, number> = { i32: 4, f64: 8, v128: 16 };

/** Shots per chunk of the four-lane exact kernel (its passes' buffers hold one chunk). */
export const CHUNK = 128;
/** Entries of the ziggurat's wedge test table exp(−j/16) (memory.ts fills it). */
export const EXP_TABLE_LENGTH = 96;

/** A record of named fields (bytes each) laid out one after the other: its field offsets and size. */
function record<const F extends Record<string, number>>(fields: F): { [K in keyof F]: number } & { size: number } {
  let size = 0;
  const at: Record<string, number> = {};
  for (const [name, bytes] of Object.entries(fields)) { at[name] = size; size += bytes; }
  return { ...at, size } as { [K in keyof F]: number } & { size: number };
}

/**
 * One shot's history in the four-lane kernel's history buffer: the masks of the intended,
 * prepared and initial state (all ones: state 1), its first jump's cause and the jumped mask,
 * and the jumped lanes' value corrections (path − no-jump value) of I and Q, f64 × 4 lanes each.
 */
export const HISTORY_RECORD = record({ intended: 16, prepared: 16, initial: 16, jumpCause: 16, jumped: 16, correctionI: 32, correctionQ: 32 });
/** One normal of the four lanes (f64 × 4), in the normals buffer: nCols a shot. */
export const NORMAL_RECORD = record({ value: 32 });
/** One shot's projected value (f64 × 4) and clean masks per state, in the values buffer. */
export const VALUE_RECORD = record({ value: 32, clean0: 16, clean1: 16 });

/**
 * The slots, in memory order. "Four-lane" slots hold lane k of block k at byte 4k (i32) or 8k
 * (f64, two vectors: lanes 0–1, then 2–3); a per-state pair of them is state 0's, then state 1's.
 */
export const SLOT_SPECS = [
  // the trace engine's record loops
  { name: 'stream', type: 'i32', length: 4 }, // the record's noise stream: xoshiro128** state
  { name: 'dotResults', type: 'f64', length: 2 }, // dot's and dotPair's results
  // the ziggurat (random/ziggurat.ts): acceptance bounds, position-to-x factors, densities at the edges
  { name: 'layerBounds', type: 'i32', length: 128 },
  { name: 'layerFactors', type: 'f64', length: 128 },
  { name: 'layerDensities', type: 'f64', length: 128 },
  // exp(−j/16), j = 0 … 95: the wedge test's table (source/ziggurat.ts $below)
  { name: 'expTable', type: 'f64', length: EXP_TABLE_LENGTH },
  // the exact kernel's point and pipeline (exact/kernel.ts setScoring); [s]: per state
  { name: 'exitRate', type: 'f64', length: 2 },
  { name: 'recordLength', type: 'f64', length: 1 },
  { name: 'lastWindowSample', type: 'f64', length: 1 },
  { name: 'lastSample', type: 'f64', length: 1 }, // the pipeline's last sample time (Infinity: the window's end)
  { name: 'sampleRate', type: 'f64', length: 1 },
  { name: 'fullI', type: 'f64', length: 2 }, // the no-jump I value per initial state
  { name: 'fullQ', type: 'f64', length: 2 },
  { name: 'factorI0', type: 'f64', length: 1 }, // Cholesky factor entries: I on column 0, Q on columns 0 and 1
  { name: 'factorQ0', type: 'f64', length: 1 },
  { name: 'factorQ1', type: 'f64', length: 1 },
  { name: 'cos', type: 'f64', length: 1 },
  { name: 'sin', type: 'f64', length: 1 },
  { name: 'threshold', type: 'f64', length: 1 },
  { name: 'band', type: 'f64', length: 1 }, // the ambiguous band's half-width (negative: none)
  { name: 'jumpCause', type: 'i32', length: 4 }, // [2·from + to]
  { name: 'anyPrep', type: 'i32', length: 1 },
  { name: 'anyMap', type: 'i32', length: 1 },
  { name: 'hasQ', type: 'i32', length: 1 },
  { name: 'qTwoTerms', type: 'i32', length: 1 }, // factorQ1 ≠ 0
  { name: 'columns', type: 'i32', length: 1 }, // nonzero Cholesky columns (normals a shot)
  { name: 'flip', type: 'i32', length: 1 }, // 1: outcome 1 below the threshold
  { name: 'windowI', type: 'i32', length: 2 }, // I's kernel range [lo, hi)
  { name: 'windowQ', type: 'i32', length: 2 },
  { name: 'prefixI', type: 'i32', length: 2 }, // byte offsets of I's prefix sums per state
  { name: 'prefixQ', type: 'i32', length: 2 },
  // the history's decisions as integer cuts on the outputs (exact/kernel.ts setFourLaneParams), in all four lanes
  { name: 'fourFirstCut', type: 'v128', length: 1 },
  { name: 'fourFirstFlip', type: 'v128', length: 1 },
  { name: 'fourPrepCut', type: 'v128', length: 2 },
  { name: 'fourPrepFlip', type: 'v128', length: 2 },
  { name: 'fourMapCut', type: 'v128', length: 2 },
  { name: 'fourMapFlip', type: 'v128', length: 2 },
  { name: 'fourJumpCut', type: 'v128', length: 2 },
  { name: 'fourJumpFlip', type: 'v128', length: 2 },
  { name: 'fourOutcomeMask', type: 'v128', length: 2 }, // −outcomeOf[s]
  { name: 'fourPrepIntoMask', type: 'v128', length: 2 }, // −prepInto[s]
  { name: 'fourMapIntoMask', type: 'v128', length: 2 },
  // the four blocks' streams (word j of the four lanes in vector j) and results
  { name: 'fourStreams', type: 'v128', length: 4 },
  { name: 'fourLanes', type: 'v128', length: 4 },
  { name: 'fourSumState', type: 'v128', length: 1 }, // shots intended 1
  { name: 'fourSumOutcome', type: 'v128', length: 1 }, // shots with outcome 1
  { name: 'fourSumBoth', type: 'v128', length: 1 },
  { name: 'fourCleanCount', type: 'v128', length: 2 },
  { name: 'fourCauses', type: 'v128', length: 2 * CAUSES.length }, // [CAUSES.length·intended + cause]
  { name: 'fourDiscarded', type: 'v128', length: 2 },
  { name: 'fourDiscardedWrong', type: 'v128', length: 2 },
  { name: 'fourCleanSum1', type: 'v128', length: 4 }, // f64 × 4 lanes per state: Σ(x − shift) of the clean shots
  { name: 'fourCleanSum2', type: 'v128', length: 4 }, // Σ(x − shift)²
  { name: 'fourCleanShift', type: 'v128', length: 4 },
  // scratch of the rare lanes' scalar functions (source/four-rare.ts)
  { name: 'fourJumpCauses', type: 'v128', length: 1 },
  { name: 'fourJumpDraws', type: 'v128', length: 1 },
  { name: 'fourInitial', type: 'v128', length: 1 },
  { name: 'fourIntended', type: 'v128', length: 1 },
  { name: 'fourPrepared', type: 'v128', length: 1 },
  { name: 'fourNormals', type: 'v128', length: 2 }, // f64 × 4
  { name: 'fourPositions', type: 'v128', length: 1 },
  { name: 'fourLayers', type: 'v128', length: 1 },
  { name: 'oneState', type: 'i32', length: 4 }, // one lane's state, transposed
  // the four-lane kernel's buffers between its passes, one chunk each
  { name: 'fourHistories', type: 'v128', length: (CHUNK * HISTORY_RECORD.size) / 16 },
  { name: 'fourNormalsBuffer', type: 'v128', length: (2 * CHUNK * NORMAL_RECORD.size) / 16 },
  { name: 'fourValues', type: 'v128', length: (CHUNK * VALUE_RECORD.size) / 16 },
] as const satisfies readonly SlotSpec[];

export type SlotName = (typeof SLOT_SPECS)[number]['name'];

export interface Layout {
  readonly slots: readonly Slot[];
  /** The slots by name. */
  readonly byName: ReadonlyMap<string, Slot>;
  /** Byte offset of each slot. */
  readonly at: Readonly<Record<SlotName, number>>;
  /** Where the arrays start: the first page boundary after the slots. */
  readonly arrays: number;
}

const PAGE = 65536;

/** Places the slots (see the file comment); throws when two overlap. */
export function makeLayout(specs: readonly SlotSpec[]): Layout {
  const slots: Slot[] = [];
  const at: Record<string, number> = {};
  let next = 0;
  for (const s of specs) {
    const size = ELEMENT_BYTES[s.type];
    const offset = s.at ?? Math.ceil(next / size) * size;
    if (offset < next || offset % size !== 0) throw new Error(`memory layout: slot ${s.name} at ${offset} overlaps or is misaligned`);
    const slot = { ...s, offset, bytes: size * s.length };
    slots.push(slot);
    at[s.name] = offset;
    next = offset + slot.bytes;
  }
  return { slots, byName: new Map(slots.map((x) => [x.name, x])), at: at as Record<SlotName, number>, arrays: Math.ceil(next / PAGE) * PAGE };
}

/** The kernels' layout. */
export const LAYOUT: Layout = makeLayout(SLOT_SPECS);

/**
 * The name of the module's export that carries a slot's offset (an i32 global): its name, type
 * and length, so that a slot that changed anything but its offset is missing from a stale module.
 */
export function slotExportName(s: SlotSpec): string {
  return `slot:${s.name}:${s.type}:${s.length}`;
}

/** The prefix of every slot export. */
export const SLOT_EXPORT_PREFIX = 'slot:';

function slotOf(layout: Layout, name: SlotName): Slot {
  const s = layout.byName.get(name);
  if (!s) throw new Error(`memory layout: no slot ${name}`);
  return s;
}

/** An i32 view of a slot (a v128 slot as its i32 lanes). */
export function i32Slot(buffer: ArrayBuffer, name: SlotName, layout: Layout = LAYOUT): Int32Array {
  const s = slotOf(layout, name);
  if (s.type === 'f64') throw new Error(`memory layout: slot ${name} holds f64, not i32`);
  return new Int32Array(buffer, s.offset, s.bytes / 4);
}

/** An f64 view of a slot (a v128 slot as its f64 lanes). */
export function f64Slot(buffer: ArrayBuffer, name: SlotName, layout: Layout = LAYOUT): Float64Array {
  const s = slotOf(layout, name);
  if (s.type === 'i32') throw new Error(`memory layout: slot ${name} holds i32, not f64`);
  return new Float64Array(buffer, s.offset, s.bytes / 8);
}

/** Writes scalar slots by name into one instance's memory (its views made once). */
export class SlotWriter {
  private readonly f64: Float64Array;
  private readonly i32: Int32Array;

  constructor(buffer: ArrayBuffer, private readonly layout: Layout = LAYOUT) {
    this.f64 = new Float64Array(buffer, 0, layout.arrays / 8);
    this.i32 = new Int32Array(buffer, 0, layout.arrays / 4);
  }

  /** Writes all of a scalar slot's elements (as many values as its length). */
  set(name: SlotName, ...values: number[]): void {
    const s = slotOf(this.layout, name);
    if (s.type === 'v128' || values.length !== s.length) throw new Error(`memory layout: slot ${name} is ${s.type} × ${s.length}, not ${values.length} numbers`);
    const view = s.type === 'f64' ? this.f64 : this.i32, first = s.offset / (s.type === 'f64' ? 8 : 4);
    for (let j = 0; j < values.length; j++) view[first + j] = values[j]!;
  }
}
