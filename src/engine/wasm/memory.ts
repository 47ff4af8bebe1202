/**
 * The memory of the WebAssembly kernels (kernels.wat) and their instantiation: one module,
 * compiled once per thread; one instance per owner (a point's record kernel, or an exact
 * kernel), each with its own memory sized for its arrays.
 */
import { ZIGGURAT } from '../../random/ziggurat.ts';
import { WASM_BYTES } from './kernels-wasm.ts';

/** Byte offsets of kernels.wat's memory layout (its header comment lists them). */
export const LAYOUT = {
  stream: 0, lane: 16, dotResults: 32,
  layerBounds: 64, layerFactors: 1024, layerDensities: 2048,
  f64Params: 3072, i32Params: 3328, f64Results: 3456, i32Results: 3520,
  quad: 4096, quadParams: 5056, expTable: 5376, quadBuffers: 8192,
  arrays: 65536,
} as const;

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

/** A fresh instance whose memory holds the ziggurat's tables and `arrayBytes` beyond the header. */
export function instantiateKernels(arrayBytes: number): KernelInstance {
  const memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil((LAYOUT.arrays + arrayBytes) / PAGE)) });
  const buffer = memory.buffer;
  new Int32Array(buffer, LAYOUT.layerBounds, 128).set(ZIGGURAT.k);
  new Float64Array(buffer, LAYOUT.layerFactors, 128).set(ZIGGURAT.w);
  new Float64Array(buffer, LAYOUT.layerDensities, 128).set(ZIGGURAT.f);
  // the wedge test's estimate of exp (kernels.wat $below): exp(−j/16), j = 0 … 95
  const expTable = new Float64Array(buffer, LAYOUT.expTable, 96);
  for (let j = 0; j < 96; j++) expTable[j] = Math.exp(-j / 16);
  compiled ??= new WebAssembly.Module(WASM_BYTES);
  // Math.exp and Math.log themselves, so that the rejection branch's numbers are the TypeScript ones
  const instance = new WebAssembly.Instance(compiled, { env: { memory, exp: Math.exp, log: Math.log } });
  return { buffer, exports: instance.exports };
}
