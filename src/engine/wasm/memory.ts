/**
 * The memory of the WebAssembly kernels and their instantiation: one module, compiled once per
 * thread; one instance per owner (a point's record kernel, or an exact kernel), each with its
 * own memory sized for its arrays. The layout of that memory is layout.ts.
 */
import { ZIGGURAT } from '../../random/ziggurat.ts';
import { WASM_BYTES } from './kernels-wasm.ts';
import { f64Slot, i32Slot, LAYOUT, SLOT_EXPORT_PREFIX, slotExportName, type Layout } from './layout.ts';

const PAGE = 65536;
/**
 * The most array bytes an instance takes. A WebAssembly memory holds at most 4 GiB; owners whose
 * arrays need more than this run their TypeScript loops instead (the same numbers).
 */
export const MAX_KERNEL_BYTES = 2 ** 31;

let available: boolean | null = null;

/**
 * Whether this thread can run the kernels: WebAssembly at all (not, for example, under
 * `node --jitless`), and its SIMD instructions, which tallyFour uses (V8 on x64 needs SSE4.1).
 * Owners run their TypeScript loops when it cannot.
 */
export function kernelsAvailable(): boolean {
  available ??= typeof WebAssembly === 'object' && WebAssembly.validate(WASM_BYTES);
  return available;
}
let compiled: WebAssembly.Module | null = null;

/**
 * Checks a module instance's slot offsets (its `slot:…` global exports, source/module.ts)
 * against a layout: every slot of the layout, with the same name, type and length, at the same
 * offset, and no other. A mismatch means that kernels-wasm.ts was built from another layout
 * than layout.ts — an internal error, fixed by `npm run build:wasm`.
 */
export function checkLayout(exports: Record<string, unknown>, layout: Layout = LAYOUT): void {
  const problems: string[] = [];
  const unseen = new Set(Object.keys(exports).filter((k) => k.startsWith(SLOT_EXPORT_PREFIX)));
  for (const s of layout.slots) {
    const name = slotExportName(s);
    const offset = (exports[name] as WebAssembly.Global | undefined)?.value;
    unseen.delete(name);
    if (offset === undefined) problems.push(`it has no slot ${s.name} of ${s.type} × ${s.length}`);
    else if (offset !== s.offset) problems.push(`its slot ${s.name} is at byte ${offset}, the layout's at ${s.offset}`);
  }
  for (const name of unseen) problems.push(`it has a slot the layout lacks (${name.slice(SLOT_EXPORT_PREFIX.length)})`);
  if (problems.length > 0) {
    throw new Error(`internal error: the compiled WebAssembly kernels (src/engine/wasm/kernels-wasm.ts) do not match the memory `
      + `layout (src/engine/wasm/layout.ts): ${problems.slice(0, 3).join('; ')}${problems.length > 3 ? `; and ${problems.length - 3} more` : ''}. `
      + 'Run `npm run build:wasm`.');
  }
}
let checked = false;

export interface KernelInstance {
  buffer: ArrayBuffer;
  exports: Record<string, unknown>;
}

/** A fresh instance whose memory holds the ziggurat's tables and `arrayBytes` beyond the slots. */
export function instantiateKernels(arrayBytes: number): KernelInstance {
  const memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil((LAYOUT.arrays + arrayBytes) / PAGE)) });
  const buffer = memory.buffer;
  i32Slot(buffer, 'layerBounds').set(ZIGGURAT.k);
  f64Slot(buffer, 'layerFactors').set(ZIGGURAT.w);
  f64Slot(buffer, 'layerDensities').set(ZIGGURAT.f);
  // the wedge test's estimate of exp (source/ziggurat.ts $below): exp(−j/16), j = 0 … 95
  const expTable = f64Slot(buffer, 'expTable');
  for (let j = 0; j < expTable.length; j++) expTable[j] = Math.exp(-j / 16);
  compiled ??= new WebAssembly.Module(WASM_BYTES);
  // Math.exp and Math.log themselves, so that the rejection branch's numbers are the TypeScript ones
  const instance = new WebAssembly.Instance(compiled, { env: { memory, exp: Math.exp, log: Math.log } });
  if (!checked) {
    checkLayout(instance.exports);
    checked = true;
  }
  return { buffer, exports: instance.exports };
}
