/**
 * The memory of the WebAssembly kernels and their instantiation: one module, compiled once per
 * thread; one instance per owner (a point's record kernel, or an exact kernel), each with its
 * own memory sized for its arrays. The layout of that memory is layout.ts.
 */
import { ZIGGURAT } from '../../random/ziggurat.ts';
import { WASM_BYTES } from './kernels-wasm.ts';
import { f64Slot, i32Slot, LAYOUT } from './layout.ts';

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
  return { buffer, exports: instance.exports };
}
