/**
 * `npm run build:wasm`: generates the WebAssembly text of the hot loops from its templates
 * (src/engine/wasm/source/*.ts, with the memory layout of src/engine/wasm/layout.ts), compiles
 * it with wabt and writes the binary as a TypeScript module (src/engine/wasm/kernels-wasm.ts),
 * so that the simulator loads it with no file access and no build step at run time.
 * test/engine/kernels.test.ts generates and compiles the text again and fails when the written
 * module is stale. `npm run build:wasm -- --print` prints the generated text instead.
 */
import { renameSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { kernelsWat } from '../src/engine/wasm/source/module.ts';
import { compileWat, wasmModuleSource } from './wasm-source.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const text = kernelsWat();
if (process.argv.includes('--print')) {
  process.stdout.write(text);
  process.exit(0);
}
let bytes: Uint8Array;
try {
  bytes = await compileWat('kernels.wat', text);
} catch (e) {
  // wabt's message names the line and column of the generated text (see --print); its stack is the minified compiler
  console.error(String(e instanceof Error ? e.message : e).trim());
  process.exit(1);
}
const target = join(root, 'src/engine/wasm/kernels-wasm.ts');
writeFileSync(`${target}.tmp`, wasmModuleSource('src/engine/wasm/source', bytes));
renameSync(`${target}.tmp`, target);
console.log(`src/engine/wasm/source: ${bytes.length} bytes → ${target.slice(root.length + 1)}`);
