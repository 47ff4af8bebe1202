#!/usr/bin/env node
// Entry point: registers the TypeScript loader, then runs the command line.
import { register } from 'tsx/esm/api';
register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv);
