import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { formatRate, makeProgress, type ProgressStream } from '../../src/cli/progress.ts';

/** A stand-in for stderr that records what is written; `tty` sets isTTY as a terminal would. */
function fakeStream(tty: boolean): { stream: ProgressStream; text: () => string } {
  const chunks: string[] = [];
  const w = new Writable({ write(chunk, _enc, done) { chunks.push(String(chunk)); done(); } }) as Writable & { isTTY?: boolean; columns?: number };
  if (tty) { w.isTTY = true; w.columns = 100; }
  return { stream: w as unknown as ProgressStream, text: () => chunks.join('') };
}

/** A clock the test moves by hand. */
function clock() {
  let t = 0;
  return { now: () => t, advance: (ms: number) => { t += ms; } };
}

describe('progress bar', () => {
  it('draws on a terminal once the run has taken a second, with shots/s and time left', () => {
    const { stream, text } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now });
    c.advance(400);
    p.update(1000, 10000);
    expect(p.shown).toBe(false);
    expect(text()).toBe('');
    c.advance(800);
    p.update(2400, 10000);
    expect(p.shown).toBe(true);
    p.update(5000, 10000);
    p.stop();
    const out = text();
    expect(out).toContain('shots/s');
    expect(out).toContain('left');
    expect(out).toContain('/10000 shots');
    // 2400 shots in 1.2 s
    expect(out).toContain('2.00 k shots/s');
  });

  it('draws nothing in a pipe', () => {
    const { stream, text } = fakeStream(false);
    const c = clock();
    const p = makeProgress({ stream, now: c.now });
    c.advance(5000);
    p.update(100, 200);
    p.stop();
    expect(p.shown).toBe(false);
    expect(text()).toBe('');
  });

  it('draws nothing with --quiet, even on a terminal', () => {
    const { stream, text } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, quiet: true });
    c.advance(5000);
    p.update(100, 200);
    p.stop();
    expect(text()).toBe('');
  });

  it('follows a growing total (refinement adds points)', () => {
    const { stream, text } = fakeStream(true);
    const c = clock();
    const p = makeProgress({ stream, now: c.now, delay: 0 });
    p.update(10, 100);
    c.advance(100);
    p.update(100, 160);
    p.stop();
    expect(text()).toContain('/160 shots');
  });

  it.each([[0, '—'], [812.4, '812'], [12345, '12.3 k'], [1.25e6, '1.25 M']])('formats %d shots/s as %s', (x, s) => {
    expect(formatRate(x)).toBe(s);
  });
});
