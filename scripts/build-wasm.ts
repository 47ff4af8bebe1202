/**
 * `npm run build:wasm`: compiles the WebAssembly text source of the hot loops
 * (src/plan/kernels.wat) with wabt and writes its binary beside it as a TypeScript module
 * (kernels-wasm.ts), so that the simulator loads it with no file access and no build step at
 * run time. test/plan/kernels.test.ts compiles the source again and fails when the written
 * module is stale.
 */
import { readFileSync, renameSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileWat, wasmModuleSource } from './wasm-source.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const source = 'src/engine/wasm/kernels.wat';
let bytes: Uint8Array;
try {
  // (the base name: wabt garbles some longer names in its messages)
  bytes = await compileWat(basename(source), readFileSync(join(root, source), 'utf8'));
} catch (e) {
  // wabt's message names the line and column; its stack is the minified compiler
  console.error(String(e instanceof Error ? e.message : e).trim());
  process.exit(1);
}
const target = join(root, source.replace(/\.wat$/, '-wasm.ts'));
writeFileSync(`${target}.tmp`, wasmModuleSource(source, bytes));
renameSync(`${target}.tmp`, target);
console.log(`${source}: ${bytes.length} bytes → ${target.slice(root.length + 1)}`);
