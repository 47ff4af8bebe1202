/**
 * Every command that writes (run, merge, report, rerun, analyze) interrupted by SIGINT or SIGTERM
 * at TRIALS moments each (fixed seed): the signal is delivered to this process's own handlers
 * (`process.emit`, which is how Node runs a real signal's handler: on the event loop) after a
 * number of event-loop turns drawn between 0 and a little more than the command takes. Whatever
 * the moment, the command exits 0 with its new output complete and readable, or with 128 + the
 * signal's number leaving the previous complete state byte for byte — or nothing, where there was
 * nothing — and never a partial file, a staging folder or a lock. Half the trials write over a
 * previous complete state (--force), half into nothing. `run` writes its report, so that some
 * signals arrive during its report phase (which used to exit 0).
 *
 * The second signal (an immediate exit) is checked with real processes in interrupt.test.ts.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { runMain } from '../support/cli.ts';
import { readsBackWhole } from '../support/read-back.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
/** Interruptions per command (the acceptance asks for at least 20). */
const TRIALS = 22;
const SEED = 20261216;

const base = mkdtempSync(join(tmpdir(), 'singleshot-interrupt-commands-'));
const at = (...p: string[]) => join(base, ...p);
afterAll(() => rmSync(base, { recursive: true, force: true }));

/** Every file under a path (a folder, or one file), by relative name, with its hash. */
function snapshot(path: string): Record<string, string> | null {
  if (!existsSync(path)) return null;
  if (!statSync(path).isDirectory()) return { '': createHash('sha256').update(readFileSync(path)).digest('hex') };
  const out: Record<string, string> = {};
  const walk = (d: string, prefix: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const rel = prefix ? `${prefix}/${e.name}` : e.name;
      if (e.isDirectory()) walk(join(d, e.name), rel);
      else out[rel] = createHash('sha256').update(readFileSync(join(d, e.name))).digest('hex');
    }
  };
  walk(path, '');
  return out;
}

/** Housekeeping that must never stay behind: a lock, a staging folder, a temporary file. */
function leftovers(dir: string): string[] {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) return [];
  return readdirSync(dir).filter((n) => n === '.singleshot-lock' || n.startsWith('.singleshot-new-') || n.startsWith('.partial-'));
}

/** Runs `args` and delivers `signal` after `turns` event-loop turns (never, if it ends first). */
async function interrupted(args: string[], turns: number, signal: 'SIGINT' | 'SIGTERM'): Promise<{ code: number; err: string; turns: number }> {
  let done = false;
  let seen = 0;
  const tick = () => {
    if (done) return;
    if (seen++ === turns) process.emit(signal);
    setImmediate(tick);
  };
  setImmediate(tick);
  try {
    const r = await runMain(args);
    return { code: r.code, err: r.err, turns: seen };
  } finally {
    done = true;
  }
}

/** One writing command: how to call it into `out`, where its output is, and how to check a finished one. */
interface WritingCommand {
  name: string;
  args(out: string, force: boolean): string[];
  /** The output's path for `out` (the folder, or the page). */
  output(out: string): string;
  /** Throws unless a finished output is whole. */
  whole(out: string): Promise<void>;
}


const COMMANDS: WritingCommand[] = [
  {
    name: 'run',
    args: (out, force) => ['run', TINY, '--out', out, '--quiet', '--engine', 'traces', '--shots', '4096', ...(force ? ['--force', '--seed', '3'] : [])],
    output: (out) => out,
    whole: async (out) => {
      await readsBackWhole(out);
      expect(readFileSync(join(out, 'report.html'), 'utf8')).toMatch(/<\/html>\s*$/);
    },
  },
  {
    name: 'merge',
    args: (out, force) => ['merge', at('s1'), at('s2'), '--out', out, '--no-report', ...(force ? ['--force'] : [])],
    output: (out) => out,
    whole: readsBackWhole,
  },
  {
    name: 'report',
    args: (out, force) => ['report', at('run'), '--out', join(out, 'page.html'), ...(force ? ['--force'] : [])],
    output: (out) => join(out, 'page.html'),
    whole: async (out) => expect(readFileSync(join(out, 'page.html'), 'utf8')).toMatch(/<\/html>\s*$/),
  },
  {
    name: 'rerun',
    args: (out, force) => ['rerun', at('run'), '--out', out, ...(force ? ['--force'] : [])],
    output: (out) => out,
    whole: readsBackWhole,
  },
  {
    name: 'analyze',
    args: (out, force) => ['analyze', at('run', 'traces.arrow'), '--pipeline', at('pipeline.yaml'), '--out', out, '--labels', 'intended_outcome', ...(force ? ['--force'] : [])],
    output: (out) => out,
    whole: readsBackWhole,
  },
];

const tally: Record<string, { finished: number; interrupted: number }> = {};

beforeAll(async () => {
  const quiet = ['--quiet', '--no-report', '--engine', 'traces'];
  for (const args of [
    ['run', TINY, '--out', at('run'), '--keep-traces', 'raw', ...quiet],
    ['run', TINY, '--out', at('s1'), '--shard', '1/2', ...quiet],
    ['run', TINY, '--out', at('s2'), '--shard', '2/2', ...quiet],
  ]) {
    const r = await runMain(args);
    expect(r.code, r.err).toBe(0);
  }
  writeFileSync(at('pipeline.yaml'), 'name: main\nthreshold: optimal\ncalibration: { labels: intended_outcome }\n');
}, 60_000);

describe.each(COMMANDS)('$name interrupted at random moments', (command) => {
  it(`${TRIALS} interruptions: the previous state or nothing, or a whole new output; never a partial file`, async () => {
    // how many event-loop turns the command takes, uninterrupted
    const probe = at(`${command.name}-probe`);
    // report writes a page into a folder that exists
    const ready = (out: string) => { if (command.name === 'report') mkdirSync(out, { recursive: true }); };
    ready(probe);
    // the commands load their modules on first use: a first run warms them, so the turns
    // counted are those of a command whose modules are loaded, as in the trials
    const warm = at(`${command.name}-warm`);
    ready(warm);
    expect((await interrupted(command.args(warm, false), Number.POSITIVE_INFINITY, 'SIGINT')).code).toBe(0);
    const first = await interrupted(command.args(probe, false), Number.POSITIVE_INFINITY, 'SIGINT');
    expect(first.code, first.err).toBe(0);
    await command.whole(probe);
    const moments = fc.sample(fc.tuple(fc.integer({ min: 0, max: Math.ceil(first.turns * 1.2) + 2 }), fc.constantFrom('SIGINT' as const, 'SIGTERM' as const)), { seed: SEED + command.name.length, numRuns: TRIALS });
    tally[command.name] = { finished: 0, interrupted: 0 };
    for (const [k, [turn, signal]] of moments.entries()) {
      const out = at(`${command.name}-${k}`);
      ready(out);
      const force = k % 2 === 1;
      if (force) {
        // a previous complete state to keep (a first uninterrupted command into it)
        const made = await runMain(command.args(out, false));
        expect(made.code, made.err).toBe(0);
      }
      const before = snapshot(command.output(out));
      const r = await interrupted(command.args(out, force), turn, signal);
      const where = `${command.name}, trial ${k}: ${signal} after ${turn} of ${first.turns} turns${force ? ', over a previous state' : ''}: exit ${r.code} ${r.err}`;
      expect(leftovers(out), where).toEqual([]);
      expect(leftovers(at('run')), where).toEqual([]);
      if (r.code === 0) {
        await command.whole(out);
        tally[command.name]!.finished++;
      } else {
        expect(r.code, where).toBe(signal === 'SIGINT' ? 130 : 143);
        expect(r.err.split('\n').filter((l) => l !== ''), where).toHaveLength(1);
        const after = snapshot(command.output(out));
        // nothing where there was nothing (an empty folder made for it counts as nothing)
        if (before === null) expect(after === null || Object.keys(after).length === 0, where).toBe(true);
        else expect(after, where).toEqual(before);
        tally[command.name]!.interrupted++;
      }
    }
    // the moments reach both outcomes
    expect(tally[command.name]!.interrupted, JSON.stringify(tally[command.name])).toBeGreaterThan(TRIALS / 3);
    if (process.env.INTERRUPT_REPORT) console.log(command.name, JSON.stringify(tally[command.name]));
  }, 120_000);
});

describe('a signal during run\'s report phase', () => {
  it('exits 128 + the signal\'s number and leaves the folder as it was (it used to exit 0)', async () => {
    const out = at('report-phase');
    const made = await runMain(['run', TINY, '--out', out, '--quiet', '--engine', 'traces']);
    expect(made.code, made.err).toBe(0);
    const before = snapshot(out);
    let done = false;
    let sent = false;
    // the report phase: run.json is in the staging folder, report.html not yet
    const tick = () => {
      if (done) return;
      const staging = existsSync(out) ? readdirSync(out).find((n) => n.startsWith('.singleshot-new-')) : undefined;
      const files = staging ? readdirSync(join(out, staging)) : [];
      if (!sent && files.includes('run.json') && !files.includes('report.html')) {
        sent = true;
        process.emit('SIGINT');
      }
      setImmediate(tick);
    };
    setImmediate(tick);
    let r;
    try {
      r = await runMain(['run', TINY, '--out', out, '--quiet', '--engine', 'traces', '--force', '--seed', '5']);
    } finally {
      done = true;
    }
    expect(sent, 'the signal was sent in the report phase').toBe(true);
    expect(r.code, r.err).toBe(130);
    expect(snapshot(out)).toEqual(before);
    expect(leftovers(out)).toEqual([]);
  }, 60_000);
});
