/**
 * Vitest global set-up: builds dist/ from the sources before any test runs, so the tests that
 * start the command line as a user does (`node bin/singleshot.js`, which runs the compiled
 * JavaScript) never run a stale build.
 */
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  execFileSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });
}
