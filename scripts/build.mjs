// `npm run build` (and `prepare`, which npm ci, npm install and npm pack run): src/ → dist/.
//
// The JavaScript is bundled (esbuild): three entry files — dist/cli.js (the command line),
// dist/index.js (the library), dist/pool-worker.js (a simulation thread) — and the chunks they
// share, all in dist/ itself so that each finds the others beside it. A command loads only the
// chunks it uses, and a bundle starts faster than Node resolving every compiled module and its
// packages' files one by one (`check`: 0.13 s against 0.24 s, measured side by side). The packages that load files of their own (WebAssembly readers) or are large and
// needed only by some commands (plots, Arrow) stay outside, loaded from node_modules when used.
// Type declarations come from the TypeScript compiler (dist/types/).
//
// Everything is built into a staging folder and moved into place only when both steps succeed,
// so dist/ is never half-built and no file of a removed source lingers in the package.
import { renameSync, rmSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const staging = join(root, `.dist-${process.pid}`);
const require = createRequire(import.meta.url);

/** Loaded from node_modules at run time, not bundled. */
const EXTERNAL = ['apache-arrow', 'h5wasm', 'parquet-wasm', 'vega', 'vega-lite'];

function fail(step) {
  rmSync(staging, { recursive: true, force: true });
  process.stderr.write(`build: ${step} failed (above); dist/ is left as it was\n`);
  process.exit(1);
}

try {
  await build({
    absWorkingDir: root,
    entryPoints: { cli: 'src/cli/main.ts', index: 'src/index.ts', 'pool-worker': 'src/run/pool-worker.ts' },
    outdir: staging,
    chunkNames: 'chunk-[hash]',
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    external: EXTERNAL,
    // bundled CommonJS packages call require() for Node's own modules
    banner: { js: "import { createRequire as __singleshotRequire } from 'node:module'; const require = __singleshotRequire(import.meta.url);" },
    logLevel: 'warning',
  });
} catch {
  fail('bundling');
}
// the compiler's own launcher (the package exports no path to it; its package.json is exported)
const tsc = join(dirname(require.resolve('typescript/package.json')), 'bin', 'tsc');
try {
  execFileSync(process.execPath, [tsc, '-p', join(root, 'tsconfig.build.json'), '--outDir', join(staging, 'types')], { cwd: root, stdio: 'inherit' });
} catch {
  fail('the type declarations');
}
rmSync(join(root, 'dist'), { recursive: true, force: true });
renameSync(staging, join(root, 'dist'));
