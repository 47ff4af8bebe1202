/**
 * The jump-ahead machinery (random/jump.ts) against plain stepping: a jump of 2^k steps equals
 * 2^k single steps (k = 0 … 12), the stream table's first entry equals 64 squarings, jumps
 * compose, consecutive-block streams equal streams made from scratch, and one stream jump
 * equals the 2^64 jump polynomial of the generator's reference implementation.
 */
import { describe, expect, it } from 'vitest';
import { jumpOneStream, jumpPowerOfTwo, jumpStreams } from '../../src/random/jump.ts';
import { nextUint32, stepLinear } from '../../src/random/xoshiro.ts';
import { BlockStreams, baseState, makeStream } from '../../src/random/streams.ts';

const START = Uint32Array.from([0x9e3779b9, 0x243f6a88, 0xb7e15162, 0x00000001]);
const hex = (s: Uint32Array) => Array.from(s, (w) => w.toString(16).padStart(8, '0')).join(' ');

describe('jumpPowerOfTwo', () => {
  it.each(Array.from({ length: 13 }, (_, k) => k))('a jump of 2^%i steps equals that many single steps', (k) => {
    const stepped = Uint32Array.from(START);
    for (let i = 0; i < 2 ** k; i++) stepLinear(stepped);
    const jumped = jumpPowerOfTwo(Uint32Array.from(START), k);
    expect(hex(jumped), `k = ${k}`).toBe(hex(stepped));
  });

  it('the linear step is the state update of the generator itself', () => {
    const a = Uint32Array.from(START), b = Uint32Array.from(START);
    for (let i = 0; i < 1000; i++) {
      nextUint32(a);
      stepLinear(b);
    }
    expect(hex(a)).toBe(hex(b));
  });
});

describe('jumpOneStream (byte-sliced table)', () => {
  it.each([
    ['a fixed state', START],
    ['single bits', Uint32Array.from([1, 0, 0, 0x80000000])],
    ['all ones', Uint32Array.from([0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff])],
  ])('%s: equals the 2^64 jump by bit tests (jumpPowerOfTwo(s, 64))', (_name, s) => {
    expect(hex(jumpOneStream(Uint32Array.from(s)))).toBe(hex(jumpPowerOfTwo(Uint32Array.from(s), 64)));
  });
});

describe('jumpStreams', () => {
  it('one stream is 2^64 steps: jumpStreams(s, 1) = jumpPowerOfTwo(s, 64)', () => {
    expect(hex(jumpStreams(Uint32Array.from(START), 1))).toBe(hex(jumpPowerOfTwo(Uint32Array.from(START), 64)));
  });

  it('stream 2^i is the table entry i: jumpStreams(s, 2^i) = jumpPowerOfTwo(s, 64 + i)', () => {
    for (const i of [1, 5, 17, 39]) {
      expect(hex(jumpStreams(Uint32Array.from(START), 2 ** i)), `i = ${i}`).toBe(hex(jumpPowerOfTwo(Uint32Array.from(START), 64 + i)));
    }
  });

  it.each([[3, 5], [1, 1023], [2 ** 20 + 7, 2 ** 31 - 1], [12345, 2 ** 39]])('jumps compose: %i then %i streams = their sum', (a, b) => {
    const twice = jumpStreams(jumpStreams(Uint32Array.from(START), a), b);
    expect(hex(twice)).toBe(hex(jumpStreams(Uint32Array.from(START), a + b)));
  });

  it('equals the 2^64 jump polynomial of the reference xoshiro128** code', () => {
    // JUMP constants of xoshiro128starstar.c, Blackman & Vigna (2018), from memory; the
    // reference jump() XORs in the states at which the polynomial's bits are set.
    const JUMP = [0x8764000b, 0xf542d2d3, 0x6fa035c3, 0x77f2db5b];
    const s = Uint32Array.from(START);
    const acc = new Uint32Array(4);
    for (const word of JUMP) {
      for (let b = 0; b < 32; b++) {
        if ((word >>> b) & 1) for (let i = 0; i < 4; i++) acc[i] ^= s[i]!;
        stepLinear(s);
      }
    }
    expect(hex(jumpStreams(Uint32Array.from(START), 1))).toBe(hex(acc));
  });

  it('refuses indices outside the table', () => {
    expect(() => jumpStreams(Uint32Array.from(START), -1)).toThrow(RangeError);
    expect(() => jumpStreams(Uint32Array.from(START), 2 ** 40)).toThrow(RangeError);
  });
});

describe('block streams', () => {
  it('BlockStreams.next gives the same stream as makeStream for the next block', () => {
    const blocks = new BlockStreams(7, 3, 'score', 10);
    for (let b = 10; b < 14; b++) {
      const fromScratch = makeStream(7, 3, 'score', b);
      const chained = b === 10 ? blocks.current() : blocks.next();
      expect(blocks.index).toBe(b);
      const x = Array.from({ length: 8 }, () => chained.nextUint32());
      const y = Array.from({ length: 8 }, () => fromScratch.nextUint32());
      expect(x, `block ${b}`).toEqual(y);
    }
  });

  it('advanceInto repositions one stream in place at each next block, as streams made from scratch', () => {
    const blocks = new BlockStreams(7, 3, 'score', 20);
    const stream = blocks.current();
    stream.nextUint32(); // a used stream: its old position must not matter
    for (let b = 21; b < 25; b++) {
      blocks.advanceInto(stream);
      expect(blocks.index).toBe(b);
      const fromScratch = makeStream(7, 3, 'score', b);
      const x = Array.from({ length: 8 }, () => stream.nextUint32());
      const y = Array.from({ length: 8 }, () => fromScratch.nextUint32());
      expect(x, `block ${b}`).toEqual(y);
    }
  });

  it('BlockStreams made one after another (from the last start, a short jump) start where makeStream does', () => {
    // forward, backward, another point, purpose and seed, and forward again across many blocks
    const order: [number, number, 'score' | 'calibrate', number][] = [
      [7, 3, 'score', 40], [7, 3, 'score', 44], [7, 3, 'score', 44], [7, 3, 'score', 41], [7, 3, 'score', 1000003],
      [7, 4, 'score', 1000007], [7, 3, 'calibrate', 1000008], [8, 3, 'score', 1000009], [7, 3, 'score', 2 ** 24 - 1],
    ];
    for (const [seed, point, purpose, block] of order) {
      const got = new BlockStreams(seed, point, purpose, block).current();
      const want = makeStream(seed, point, purpose, block);
      expect(Array.from(got.state()), `${seed}/${point}/${purpose}/${block}`).toEqual(Array.from(want.state()));
    }
  });

  it('different seeds give different base states (never all zero)', () => {
    const seen = new Set<string>();
    for (let seed = 0; seed < 200; seed++) {
      const s = baseState(seed);
      expect(s.some((w) => w !== 0)).toBe(true);
      seen.add(hex(s));
    }
    expect(seen.size).toBe(200);
  });
});
