/**
 * The WebAssembly kernels' memory layout (engine/wasm/layout.ts) and its check at load
 * (memory.ts checkLayout): the committed module carries the layout's offsets, and a module
 * generated from another layout — a slot moved, resized, added or gone — is refused with a
 * message that names the slot. Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { compileWat } from '../../scripts/wasm-source.ts';
import { LAYOUT, makeLayout, SLOT_SPECS, type SlotSpec } from '../../src/engine/wasm/layout.ts';
import { checkLayout, instantiateKernels } from '../../src/engine/wasm/memory.ts';
import { kernelsWat } from '../../src/engine/wasm/source/module.ts';

/** The exports of a module compiled from the templates with another slot list. */
async function exportsOf(specs: readonly SlotSpec[]): Promise<Record<string, unknown>> {
  const bytes = await compileWat('kernels.wat', kernelsWat(makeLayout(specs)));
  const memory = new WebAssembly.Memory({ initial: 1 });
  return new WebAssembly.Instance(new WebAssembly.Module(bytes), { env: { memory, exp: Math.exp, log: Math.log } }).exports;
}

describe('kernel memory layout', () => {
  it('slots do not overlap, are aligned, and end before the arrays', () => {
    const sorted = [...LAYOUT.slots].sort((a, b) => a.offset - b.offset);
    for (let i = 1; i < sorted.length; i++) {
      expect(sorted[i]!.offset, `${sorted[i]!.name} after ${sorted[i - 1]!.name}`).toBeGreaterThanOrEqual(sorted[i - 1]!.offset + sorted[i - 1]!.bytes);
    }
    for (const s of LAYOUT.slots) expect(s.offset % (s.type === 'v128' ? 16 : s.type === 'f64' ? 8 : 4), s.name).toBe(0);
    const last = sorted[sorted.length - 1]!;
    expect(last.offset + last.bytes).toBeLessThanOrEqual(LAYOUT.arrays);
    expect(() => makeLayout([{ name: 'a', type: 'f64', length: 2 }, { name: 'b', type: 'i32', length: 1, at: 8 }])).toThrow(/slot b/);
  });

  it('the committed module carries every slot at its offset', () => {
    expect(() => checkLayout(instantiateKernels(0).exports)).not.toThrow();
  });

  it('the templates generate the same check from the same layout', async () => {
    const exports = await exportsOf(SLOT_SPECS);
    expect(() => checkLayout(exports)).not.toThrow();
  });

  it.each([
    ['a slot resized', (s: SlotSpec) => (s.name === 'fullQ' ? [{ ...s, length: 3 }] : [s]), /no slot fullQ of f64 × 2.*factorI0 is at byte/],
    ['a slot added before the others', (s: SlotSpec) => (s.name === 'stream' ? [{ name: 'extra', type: 'v128', length: 1 }, s] : [s]), /slot stream is at byte 16, the layout's at 0; .*; and \d+ more/],
    ['a slot of another type', (s: SlotSpec) => (s.name === 'columns' ? [{ ...s, type: 'f64' }] : [s]), /no slot columns of i32 × 1/],
  ] as const)('a module built from another layout is refused, naming the slot: %s', async (_what, change, message) => {
    const exports = await exportsOf(SLOT_SPECS.flatMap((s) => change(s) as SlotSpec[]));
    expect(() => checkLayout(exports)).toThrow(/internal error: the compiled WebAssembly kernels .* do not match/);
    expect(() => checkLayout(exports)).toThrow(message);
  });
});
