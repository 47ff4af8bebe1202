/**
 * Writes the raw 32-bit output of the simulator's generator (xoshiro128**, seeded and jumped
 * exactly as a run does) to standard output as little-endian uint32 words, for `dieharder -g 200`.
 *
 *   node bin/run-ts.js bench/dieharder-source.ts [--seed N] [--streams K] [--words N]
 *
 * --streams K interleaves the first K seeding blocks of point 0 ("score"): word i comes from
 * stream i mod K, so the tests see neighbouring streams side by side (K = 1: one stream).
 * --words N stops after N words (default: never; dieharder closes the pipe when done).
 */
import { makeStream } from '../src/random/streams.ts';
import type { RandomStream } from '../src/random/stream.ts';

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(name);
  if (i < 0) return fallback;
  const v = Number(process.argv[i + 1]);
  if (!Number.isSafeInteger(v) || v < 0) {
    process.stderr.write(`${name} needs a whole number ≥ 0\n`);
    process.exit(2);
  }
  return v;
}

const seed = option('--seed', 1);
const streamCount = Math.max(1, option('--streams', 1));
const limit = option('--words', 0);
const streams: RandomStream[] = Array.from({ length: streamCount }, (_, b) => makeStream(seed, 0, 'score', b));

const WORDS = 1 << 16;
let written = 0;
process.stdout.on('error', () => process.exit(0)); // dieharder closed the pipe: done

function fill(): Buffer {
  const words = new Uint32Array(WORDS);
  if (streamCount === 1) {
    const s = streams[0]!;
    for (let i = 0; i < WORDS; i++) words[i] = s.nextUint32();
  } else {
    for (let i = 0; i < WORDS; i++) words[i] = streams[(written + i) % streamCount]!.nextUint32();
  }
  written += WORDS;
  // uint32 words in the machine's byte order (little-endian on x86 and ARM), as dieharder reads them
  return Buffer.from(words.buffer);
}

function pump(): void {
  for (;;) {
    if (limit > 0 && written >= limit) {
      process.stdout.end();
      return;
    }
    let chunk = fill();
    if (limit > 0 && written > limit) chunk = chunk.subarray(0, chunk.byteLength - (written - limit) * 4);
    if (!process.stdout.write(chunk)) {
      process.stdout.once('drain', pump);
      return;
    }
  }
}
pump();
