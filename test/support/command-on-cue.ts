/**
 * A child process for tests that need a second singleshot process: it boots once, then runs the
 * command line (`main`) whenever a line of JSON arrives on stdin — `{"id": …, "delay": ms,
 * "args": [...]}` — and answers on stdout with one line `{"id": …, "code": …, "stderr": "…"}`.
 * What the commands print is captured, so stdout carries only the answers.
 *
 *   node bin/run-ts.js test/support/command-on-cue.ts
 */
import { createInterface } from 'node:readline';
import { main } from '../../src/cli/main.ts';

const answer = process.stdout.write.bind(process.stdout);
let queue: Promise<void> = Promise.resolve();

createInterface({ input: process.stdin }).on('line', (line) => {
  const cue = JSON.parse(line) as { id: string; delay?: number; args: string[] };
  queue = queue.then(async () => {
    await new Promise((r) => setTimeout(r, cue.delay ?? 0));
    let stderr = '';
    const out = process.stdout.write, err = process.stderr.write;
    process.stdout.write = (() => true) as typeof process.stdout.write;
    process.stderr.write = ((s: string | Uint8Array) => { stderr += String(s); return true; }) as typeof process.stderr.write;
    let code: number;
    try {
      code = await main(['node', 'singleshot', ...cue.args]);
    } catch (e) {
      code = -1;
      stderr += `uncaught: ${(e as Error).stack ?? String(e)}`;
    } finally {
      process.stdout.write = out;
      process.stderr.write = err;
    }
    answer(`${JSON.stringify({ id: cue.id, code, stderr })}\n`);
  });
});
answer('{"ready":true}\n');
