#!/usr/bin/env node
// Runs a TypeScript file (benchmarks, scripts) with the tsx loader registered.
import { register } from 'tsx/esm/api';
import { pathToFileURL } from 'node:url';
import { resolve } from 'node:path';
register();
const file = process.argv[2];
if (!file) { console.error('usage: run-ts.js FILE.ts [args]'); process.exit(2); }
process.argv.splice(2, 1);
await import(pathToFileURL(resolve(file)).href);
