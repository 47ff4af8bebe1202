import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { formatClock, formatRate, makeProgress, type ProgressStream } from '../../src/cli/progress.ts';

/** A stand-in for stderr that records what is written; `tty` sets isTTY as a terminal would. */
function fakeStream(tty: boolean): { stream: ProgressStream; text: () => string; last: () => string } {
  const chunks: string[] = [];
  const w = new Writable({ write(chunk, _enc, done) { chunks.push(String(chunk)); done(); } }) as Writable & { isTTY?: boolean; columns?: number };
  if (tty) { w.isTTY = true; w.columns = 120; }
  const text = () => chunks.join('');
  // what the terminal shows now: the text after the last carriage return, without the erase code
  const last = () => text().split('\r').pop()!.replace('\x1b[K', '');
  return { stream: w as unknown as ProgressStream, text, last };
}

/** A clock the test moves by hand. */
function clock() {
  let t = 0;
  return { now: () => t, advance: (ms: number) => { t += ms; } };
}

describe('progress line', () => {
  it('appears after a second even before anything is counted, naming the set-up', () => {
    const { stream, text, last } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, every: 0 });
    c.advance(500);
    p.tick();
    expect(text()).toBe('');
    c.advance(700);
    p.tick();
    expect(p.shown).toBe(true);
    expect(last()).toMatch(/^setting up .* 1 s$/);
    p.stop();
  });

  it('names the calibration, then the simulation, each with its own rate and time left', () => {
    const { stream, last } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, every: 0 });
    c.advance(1200);
    p.update(1024, 4096, 'calibrating');
    // the phase has just begun: no rate to give a time left from, and no "0 s left"
    expect(last()).toMatch(/^calibrating .* 25% \| 1024\/4096 shots \| — shots\/s \| time left: measuring$/);
    c.advance(1000);
    p.update(3072, 4096, 'calibrating');
    // 2048 shots in 1 s since the phase began: 1024 left take 0.5 s
    expect(last()).toContain('2.05 k shots/s | 1 s left');
    c.advance(100);
    p.update(2000, 10000, 'simulating');
    expect(last()).toMatch(/^simulating .* 20% \| 2000\/10000 shots .* time left: measuring$/);
    c.advance(2000);
    p.update(6000, 10000);
    // 4000 shots in 2 s: 4000 left take 2 s
    expect(last()).toContain('6000/10000 shots | 2.00 k shots/s | 2 s left');
    p.stop();
    expect(last()).toBe('');
  });

  it('draws nothing in a pipe', () => {
    const { stream, text } = fakeStream(false);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, every: 0 });
    c.advance(5000);
    p.update(100, 200);
    p.tick();
    p.stop();
    expect(p.shown).toBe(false);
    expect(text()).toBe('');
  });

  it('draws nothing with --quiet, even on a terminal', () => {
    const { stream, text } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, quiet: true, every: 0 });
    c.advance(5000);
    p.update(100, 200);
    p.stop();
    expect(text()).toBe('');
  });

  it('follows a growing total (refinement adds points)', () => {
    const { stream, last } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, delay: 0, every: 0 });
    p.update(10, 100);
    c.advance(100);
    p.update(100, 160);
    expect(last()).toContain('100/160 shots');
    p.stop();
  });

  it('redraws by itself while no batch arrives (a long calibration of one point)', async () => {
    const { stream, text } = fakeStream(true);
    const p = makeProgress({ stream, delay: 0, every: 10 });
    await new Promise((r) => setTimeout(r, 60));
    p.stop();
    expect(text().split('\r').filter((s) => s.startsWith('setting up')).length).toBeGreaterThanOrEqual(2);
  });

  it.each([[0, '—'], [812.4, '812'], [12345, '12.3 k'], [1.25e6, '1.25 M']])('formats %d shots/s as %s', (x, s) => {
    expect(formatRate(x)).toBe(s);
  });

  it.each([[0.4, '0 s'], [59.4, '59 s'], [200, '3 min 20 s'], [7500, '2 h 05 min']])('formats %d s as %s', (x, s) => {
    expect(formatClock(x)).toBe(s);
  });
});
