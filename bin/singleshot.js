#!/usr/bin/env -S node --max-semi-space-size=2
// Entry point: runs the compiled command line (dist/, built by `npm run build`, which
// `npm ci`, `npm install` and `npm pack` run through `prepare`). Plain JavaScript, no loader.
// A small young generation keeps memory flat over long runs (each batch leaves short-lived
// arrays behind; V8 would otherwise keep growing its nursery): 2 MB semi-spaces cost no speed.
let cli;
try {
  cli = await import('../dist/cli.js');
} catch (e) {
  if (e?.code !== 'ERR_MODULE_NOT_FOUND' || !String(e.message).includes('dist')) throw e;
  process.stderr.write('singleshot: the compiled program (dist/) is missing: run `npm run build` in the package folder\n');
  process.exit(2);
}
process.exitCode = await cli.main(process.argv);
