/**
 * The WebAssembly kernels' text, generated from the templates in this folder and the memory
 * layout (layout.ts): `npm run build:wasm` compiles it into kernels-wasm.ts, and a test compiles
 * it again to check that the committed binary is current.
 *
 * The module holds the simulator's two hot loops and the ziggurat they share:
 *   - the trace engine's per-sample loops (record.ts; record-loops.ts RecordKernel);
 *   - the exact engine's kernel for the common point whose every jump ends the chain and whose
 *     signal has no analog response, on four seeding blocks at once in SIMD lanes (four-lane.ts,
 *     four-lane-tally.ts, four-rare.ts; exact/kernel.ts), with the cause of a wrong shot
 *     (causes.ts).
 * Each does the arithmetic of its TypeScript counterpart in the same order, with Math.exp and
 * Math.log imported, so the numbers are the same to the bit.
 */
import { LAYOUT, slotExportName, type Layout } from '../layout.ts';
import { causeFunction } from './causes.ts';
import { rareLaneFunctions } from './four-rare.ts';
import { tallyFourFunction } from './four-lane.ts';
import { recordFunctions } from './record.ts';
import { nextAndUniform } from './xoshiro.ts';
import { zigguratFunctions } from './ziggurat.ts';

/** The module's WebAssembly text for a memory layout (the kernels' own by default). */
export function kernelsWat(layout: Layout = LAYOUT): string {
  const slots = layout.slots.map((s) => `;;   ${String(s.offset).padStart(5)}  ${s.name}: ${s.type} × ${s.length}`).join('\n');
  return `;; Generated from src/engine/wasm/source/*.ts (npm run build:wasm); the templates are the source.
;; Memory (imported; offsets in bytes, from src/engine/wasm/layout.ts):
${slots}
;;   ${String(layout.arrays).padStart(5)}… arrays (waveforms, kernels and record; or prefix sums)
(module
  (import "env" "memory" (memory 1))
  (import "env" "exp" (func $exp (param f64) (result f64)))
  (import "env" "log" (func $log (param f64) (result f64)))
${slotGlobals(layout)}
${nextAndUniform()}${zigguratFunctions(layout)}${recordFunctions(layout)}${causeFunction()}${rareLaneFunctions(layout)}${tallyFourFunction(layout)})
`;
}

/**
 * Each slot's offset as an exported i32 global named after the slot, its type and its length
 * (layout.ts slotExportName), which memory.ts checkLayout compares with the layout at load.
 * One global per slot rather than one checksum of the layout: a stale module then says which
 * slot moved or changed, not only that something did.
 */
function slotGlobals(layout: Layout): string {
  return layout.slots.map((s) => `  (global (export "${slotExportName(s)}") i32 (i32.const ${s.offset}))`).join('\n');
}
