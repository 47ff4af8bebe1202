/**
 * The worker side of pool.ts: receives the points of a run, then batch tasks; runs each with
 * the engine it names and posts the ShotBatch back with its typed arrays transferred.
 */
import { parentPort } from 'node:worker_threads';
import { InputError, ScenarioProblem } from '../errors.ts';
import { transferables, type FromWorker, type ToWorker, type WireError } from './pool.ts';
import { TaskRunner } from './task-runner.ts';

function wire(e: unknown): WireError {
  if (e instanceof InputError) return { name: 'InputError', message: e.message, stack: e.stack, file: e.file, path: e.path };
  if (e instanceof ScenarioProblem) return { name: 'ScenarioProblem', message: e.message, problem: { path: [...e.path], expected: e.expected, found: e.found, point: e.point } };
  if (e instanceof Error) return { name: e.name, message: e.message, stack: e.stack };
  return { name: 'Error', message: String(e) };
}

const port = parentPort;
if (!port) throw new Error('pool-worker.ts runs only as a worker thread (see pool.ts)');
let runner: TaskRunner | null = null;
port.on('message', (m: ToWorker) => {
  if (m.type === 'points') {
    if (runner) runner.setPlans(m.plans);
    else runner = new TaskRunner(m.plans);
    return;
  }
  let reply: FromWorker;
  try {
    const batch = runner!.run(m.task);
    reply = { type: 'result', run: m.run, seq: m.seq, batch };
    port.postMessage(reply, transferables(batch));
  } catch (e) {
    reply = { type: 'error', run: m.run, seq: m.seq, error: wire(e) };
    port.postMessage(reply);
  }
});
