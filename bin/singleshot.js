#!/usr/bin/env -S node --max-semi-space-size=2
// Entry point: registers the TypeScript loader, then runs the command line.
// A small young generation keeps memory flat over long runs (each batch leaves short-lived
// arrays behind; V8 would otherwise keep growing its nursery): 2 MB semi-spaces cost no speed.
import { register } from 'tsx/esm/api';
register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv);
