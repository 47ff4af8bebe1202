/**
 * `npm run build:wasm`: compiles each WebAssembly text source in src/ (*.wat) with wabt and
 * writes its binary beside it as a TypeScript module (NAME-wasm.ts), so that the simulator
 * loads it with no file access and no build step at run time. test/signal/record-kernel.test.ts
 * compiles the sources again and fails when a written module is stale.
 */
import { readFileSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileWat, wasmModuleSource } from './wasm-source.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const sources = ['src/plan/kernels.wat'];
for (const source of sources) {
  const bytes = await compileWat(source, readFileSync(join(root, source), 'utf8'));
  const target = join(root, source.replace(/\.wat$/, '-wasm.ts'));
  writeFileSync(`${target}.tmp`, wasmModuleSource(source, bytes));
  renameSync(`${target}.tmp`, target);
  console.log(`${source}: ${bytes.length} bytes → ${target.slice(root.length + 1)}`);
}
