/**
 * Fuzzed scenario *files*: byte-level damage (random bytes including ones that are not UTF-8,
 * insertions, deletions, duplicated and swapped lines, truncation), YAML anchors and aliases
 * grafted onto valid scenarios, and generated "billion laughs" files. Every case goes through
 * what `loadScenarioFile` does after reading (UTF-8 decoding, YAML/JSON parsing, resolution)
 * and must end in a Scenario that passes the invariants or an InputError of one well-formed line per problem.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { isCollection, isScalar, parseDocument, visit, type Node } from 'yaml';
import { decodeScenarioBytes, loadScenarioDocument, loadScenarioText } from '../../src/scenario/load.ts';
import { MAX_ALIAS_COUNT, MAX_NESTING, parseScenarioText } from '../../src/scenario/parse.ts';
import { starterScenario } from '../../src/scenario/starter.ts';
import { InputError } from '../../src/errors.ts';
import { FUZZ_SEED, inputErrorProblem, scenarioProblem } from './harness.ts';

const FILE = 'fuzzed.yaml';
const TEXTS: Record<string, string> = {
  starter: starterScenario(),
  demo: readFileSync(join(import.meta.dirname, '..', '..', 'scenarios', 'demo.yaml'), 'utf8'),
};
const NAMES = Object.keys(TEXTS);

/** Loads bytes as `loadScenarioFile` would; returns null when all is well, else the problem. */
function problemWith(bytes: Uint8Array): string | null {
  let doc: unknown;
  try {
    const text = decodeScenarioBytes(bytes, FILE);
    doc = parseScenarioText(text, FILE);
    const loaded = loadScenarioDocument(doc, FILE);
    return scenarioProblem(loaded.scenario);
  } catch (e) {
    return inputErrorProblem(e, FILE, doc);
  }
}

type Edit = { label: string; apply(b: Uint8Array): Uint8Array };

const byteEdit = (length: number): fc.Arbitrary<Edit> => fc.oneof(
  fc.tuple(fc.nat(length), fc.integer({ min: 0, max: 255 })).map(([at, v]): Edit => ({
    label: `byte ${at} = 0x${v.toString(16)}`,
    apply: (b) => { const c = b.slice(); if (at < c.length) c[at] = v; return c; },
  })),
  fc.tuple(fc.nat(length), fc.uint8Array({ minLength: 1, maxLength: 8 })).map(([at, ins]): Edit => ({
    label: `insert ${Buffer.from(ins).toString('hex')} at ${at}`,
    apply: (b) => Buffer.concat([b.subarray(0, at), ins, b.subarray(at)]),
  })),
  fc.tuple(fc.nat(length), fc.integer({ min: 1, max: 200 })).map(([at, n]): Edit => ({
    label: `delete ${n} bytes at ${at}`,
    apply: (b) => Buffer.concat([b.subarray(0, at), b.subarray(at + n)]),
  })),
  fc.nat(length).map((at): Edit => ({ label: `truncate at ${at}`, apply: (b) => b.slice(0, at) })),
  fc.tuple(fc.nat(200), fc.nat(200)).map(([i, j]): Edit => ({
    label: `swap lines ${i} and ${j}`,
    apply: (b) => {
      const lines = Buffer.from(b).toString('latin1').split('\n');
      if (i < lines.length && j < lines.length) [lines[i], lines[j]] = [lines[j]!, lines[i]!];
      return Buffer.from(lines.join('\n'), 'latin1');
    },
  })),
  fc.nat(200).map((i): Edit => ({
    label: `duplicate line ${i}`,
    apply: (b) => {
      const lines = Buffer.from(b).toString('latin1').split('\n');
      if (i < lines.length) lines.splice(i, 0, lines[i]!);
      return Buffer.from(lines.join('\n'), 'latin1');
    },
  })),
  fc.constantFrom<Edit>(
    { label: 'UTF-16 LE with BOM', apply: (b) => Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(Buffer.from(b).toString('utf8'), 'utf16le')]) },
    { label: 'Latin-1 µ', apply: (b) => Buffer.from(Buffer.from(b).toString('utf8').replace(/u([sV])/g, 'µ$1'), 'latin1') },
    { label: 'CRLF line ends', apply: (b) => Buffer.from(Buffer.from(b).toString('utf8').replace(/\n/g, '\r\n')) },
    { label: 'UTF-8 BOM', apply: (b) => Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), b]) },
    { label: 'tabs for indentation', apply: (b) => Buffer.from(Buffer.from(b).toString('utf8').replace(/^ {2}/gm, '\t')) },
    { label: 'NUL bytes', apply: (b) => Buffer.from(Buffer.from(b).toString('utf8').replace(/: /g, ':\u0000 ')) },
  ),
);

const damagedFile = fc.constantFrom(...NAMES).chain((name) => {
  const bytes = Buffer.from(TEXTS[name]!, 'utf8');
  return fc.array(byteEdit(bytes.length), { minLength: 1, maxLength: 3 }).map((edits) => {
    let b: Uint8Array = bytes;
    for (const e of edits) b = e.apply(b);
    return { name, bytes: b, labels: edits.map((e) => e.label) };
  });
});

const PARSED = Object.fromEntries(NAMES.map((n) => [n, parseDocument(TEXTS[n]!)]));

/**
 * Grafts aliases onto a valid file: a node gets an anchor and a later node (in document order)
 * becomes an alias of it — a copy of a value, a wrong type, or, when the later node lies inside
 * the anchored one, a document that contains itself.
 */
const aliasedFile = fc.tuple(fc.constantFrom(...NAMES), fc.array(fc.tuple(fc.nat(), fc.nat()), { minLength: 1, maxLength: 4 }), fc.boolean())
  .map(([name, pairs, flow]) => {
    const build = (use: [number, number][]) => {
      const doc = PARSED[name]!.clone();
      const nodes: Node[] = [];
      visit(doc, { Node: (_k, n) => { if (isScalar(n) || isCollection(n)) nodes.push(n as Node); } });
      const labels: string[] = [];
      for (const [x, y] of use) {
        const a = x % (nodes.length - 1);
        const b = a + 1 + (y % (nodes.length - 1 - a));
        const source = nodes[a]!, target = nodes[b]!;
        const alias = doc.createAlias(source as never);
        visit(doc, { Node: (_k, n) => (n === target ? alias : undefined) });
        labels.push(`node ${a} aliased at ${b}`);
      }
      return { text: doc.toString({ collectionStyle: flow ? 'flow' : 'any' }), labels };
    };
    let built;
    try {
      built = build(pairs);
    } catch {
      built = build(pairs.slice(0, 1)); // a later graft removed an earlier anchor
    }
    return { name, bytes: Buffer.from(built.text, 'utf8'), labels: built.labels };
  });

describe('fuzzed scenario files', () => {
  it('byte-level damage: a Scenario or an InputError, one line per problem (1000 cases)', () => {
    fc.assert(fc.property(damagedFile, ({ name, bytes, labels }) => {
      const problem = problemWith(bytes);
      if (problem) throw new Error(`${name} with ${labels.join('; ')}: ${problem}`);
    }), { seed: FUZZ_SEED, numRuns: 1000, endOnFailure: true });
  }, 60_000);

  it('anchors and aliases grafted onto valid files (400 cases)', () => {
    fc.assert(fc.property(aliasedFile, ({ name, bytes, labels }) => {
      const problem = problemWith(bytes);
      if (problem) throw new Error(`${name} with ${labels.join('; ')}: ${problem}\n${Buffer.from(bytes).toString('utf8')}`);
    }), { seed: FUZZ_SEED, numRuns: 400, endOnFailure: true });
  }, 60_000);

  it(`"billion laughs" files of any fan-out and depth are refused past ${MAX_ALIAS_COUNT} alias expansions (200 cases)`, () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 40 }), fc.integer({ min: 2, max: 30 }), fc.boolean(), (fanOut, depth, flow) => {
      const lines = [`l0: &l0 ${flow ? '[lol]' : 'lol'}`];
      for (let i = 1; i < depth; i++) lines.push(`l${i}: &l${i} [${new Array(fanOut).fill(`*l${i - 1}`).join(', ')}]`);
      const expansions = Array.from({ length: depth - 1 }, (_, i) => fanOut ** (i + 1)).reduce((a, b) => a + b, 0);
      let error: unknown;
      try {
        loadScenarioText(`name: lol\n${lines.join('\n')}\n`, FILE);
      } catch (e) {
        error = e;
      }
      expect(error, `${fanOut}^${depth} was accepted`).toBeInstanceOf(InputError);
      const err = error as InputError;
      // small ones fail as unknown keys; big ones must be stopped by the alias bound
      if (expansions > 10 * MAX_ALIAS_COUNT) expect(err.message).toMatch(/alias expansions/);
      expect(inputErrorProblem(err, FILE, Object.fromEntries(lines.map((_, i) => [`l${i}`, 0])))).toBeNull();
    }), { seed: FUZZ_SEED, numRuns: 200 });
  }, 60_000);

  it.each([
    ['lists', (n: number) => `name: x\ndescription: ${'['.repeat(n)}${']'.repeat(n)}\n`],
    ['mappings', (n: number) => `name: x\ndescription: ${'{a: '.repeat(n)}1${'}'.repeat(n)}\n`],
    ['JSON', (n: number) => `{"name": ${'['.repeat(n)}${']'.repeat(n)}}`],
    ['block lists', (n: number) => `name: x\ndescription:\n${Array.from({ length: n }, (_, i) => `${' '.repeat(2 * i + 2)}-`).join('\n')} x\n`],
  ])(`nesting deeper than ${MAX_NESTING} levels (%s) is an InputError, up to a million levels`, (_kind, make) => {
    for (const n of [MAX_NESTING + 1, 1000, 100_000, 1_000_000]) {
      if (_kind === 'block lists' && n > 5000) continue; // text grows as n²
      expect(() => loadScenarioText(make(n), FILE), `depth ${n}`).toThrow(/nested/);
    }
  });

  it.each([
    ['a list', 'name: x\ndescription: &a [1, *a]\n'],
    ['a mapping', 'name: x\ndescription: &a { b: *a }\n'],
  ])('an alias inside its own anchor (%s) is an InputError, not a stack overflow', (_kind, text) => {
    expect(() => loadScenarioText(text, FILE)).toThrow(/^fuzzed\.yaml: expected a document that does not contain itself, found an alias inside its own anchor$/);
  });

  it('bytes that are not UTF-8 are refused with their offset', () => {
    const bytes = Buffer.concat([Buffer.from('name: caf'), Buffer.from([0xe9]), Buffer.from('\n')]);
    expect(() => decodeScenarioBytes(bytes, FILE)).toThrow(/^fuzzed\.yaml: expected UTF-8 text, found a byte that is not UTF-8 \(0xe9 at byte 9\)$/);
    expect(() => decodeScenarioBytes(Buffer.from([0x61, 0xe2, 0x82]), FILE)).toThrow(/cut off at the end/);
    expect(decodeScenarioBytes(Buffer.from('\ufeffname: µs', 'utf8'), FILE)).toBe('name: µs');
  });
});
