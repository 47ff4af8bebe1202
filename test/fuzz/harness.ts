/**
 * Shared pieces of the scenario fuzz tests: the valid documents mutations start from, the
 * mutations themselves (fast-check arbitraries), and the checks every outcome must pass.
 *
 * Add a mutation: write an arbitrary of `Mutation` and list it in `anyMutation` (or in
 * `mildMutation` when it usually keeps the scenario valid, for the tests that run scenarios).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { InputError, InputErrors, MAX_REPORTED_ERRORS } from '../../src/errors.ts';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { starterScenario } from '../../src/scenario/starter.ts';
import { scenarioShape } from '../../src/scenario/schema.ts';
import type { Scenario } from '../../src/scenario/types.ts';

/** Seed of every fuzz test (fixed so CI is reproducible); FUZZ_SEED=n explores other cases. */
export const FUZZ_SEED = Number(process.env.FUZZ_SEED ?? 20261201);

const ROOT = join(import.meta.dirname, '..', '..');

const file = (...parts: string[]) => parseScenarioText(readFileSync(join(ROOT, ...parts), 'utf8'), parts[parts.length - 1]!);

/**
 * The valid documents that mutations start from, by name: the starter, the demos (white noise at
 * a carrier; sensor, components, 1/f, response and digitizer; a sweep) and a fixture with
 * several processing pipelines (filters, decimation, matched weights, an ambiguous band).
 */
export const BASES: Record<string, unknown> = {
  starter: parseScenarioText(starterScenario(), 'starter.yaml'),
  demo: file('scenarios', 'demo.yaml'),
  components: file('scenarios', 'demo-components.yaml'),
  sweep: file('scenarios', 'demo-sweep.yaml'),
  pipelines: file('test', 'fixtures', 'scenarios', 'pipelines.yaml'),
};
export const BASE_NAMES = Object.keys(BASES);

type Doc = Record<string, unknown> | unknown[];
type Key = string | number;

/** Every path (to leaves and containers) inside a document. */
export function allPaths(doc: unknown, prefix: Key[] = []): Key[][] {
  const out: Key[][] = [];
  if (doc !== null && typeof doc === 'object') {
    for (const [k, v] of Object.entries(doc)) {
      const key: Key = Array.isArray(doc) ? Number(k) : k;
      out.push([...prefix, key], ...allPaths(v, [...prefix, key]));
    }
  }
  return out;
}

function parentOf(doc: unknown, path: readonly Key[]): Doc | undefined {
  let node = doc;
  for (const k of path.slice(0, -1)) {
    if (node === null || typeof node !== 'object') return undefined;
    node = (node as Record<Key, unknown>)[k];
  }
  return node !== null && typeof node === 'object' ? (node as Doc) : undefined;
}

function getAt(doc: unknown, path: readonly Key[]): unknown {
  let node = doc;
  for (const k of path) {
    if (node === null || typeof node !== 'object') return undefined;
    node = (node as Record<Key, unknown>)[k];
  }
  return node;
}

function setAt(doc: unknown, path: readonly Key[], value: unknown): void {
  const parent = parentOf(doc, path);
  const key = path[path.length - 1]!;
  if (!parent || (Array.isArray(parent) && typeof key !== 'number')) return;
  Object.defineProperty(parent, key, { value, enumerable: true, writable: true, configurable: true });
}

/** A change to a document, applied in place; `label` says what it did (for failure messages). */
export interface Mutation {
  label: string;
  apply(doc: unknown): void;
}

const NUMBER_IN_TEXT = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)(.*)$/s;

/** Numbers that break naive code. */
export const hostileNumber = fc.oneof(
  fc.constantFrom(NaN, Infinity, -Infinity, -0, 0, 1, -1, 0.5, 2, 1e308, -1e308, 5e-324, 1e-300, 2 ** 53, 2 ** 53 + 2, 2 ** 32, 2 ** 64, 1e21, 1023, 1024, 1025),
  fc.double(),
  fc.integer(),
);

/** Strings that break naive code: number-like words, units, control and non-ASCII characters. */
export const hostileString = fc.oneof(
  fc.constantFrom(
    'NaN', 'Infinity', '-Infinity', 'inf', 'nan Hz', 'Infinity us', 'NaN MHz', '1e999 us', '1e-999 s', '-0 s', '0x10 MHz',
    '1_000 Hz', ' 10 MHz ', '10MHz', '10 mhz', '10 MHZ', '1e400 Hz', '.5 us', '5. us', '+5 us', '--5 us', '5 us us',
    '5 1/s', '5 /s', '5 s^-1', '5 Hz^2', '5 sqrt(Hz)', '5 A/rtHz', '5 V/sqrt(Hz)', '5 √Hz', '5 µs', '5 μs', '5 °', '30 deg',
    '5 Ohm', '5 Ω', '5 ueV', '5 meV/ns', '5 K', '5 mK', '5 pA', '5 nV', '5 (', '5 )', '5 ^', '5 s^999', '5 s^-999',
    '1e-320 s', '1e308 Gs', '1e300 THz', '1e-300 fs', '', ' ', '\u0000', '\uFFFD', 'é', '🙂', 'midpoint', 'optimal', 'auto',
    'none', 'sine', 'square', 'relaxation', '__proto__', 'constructor', 'toString', 'a'.repeat(5000), '1e5', '0', '-1',
    'yes', 'no', 'true', 'null', '~', '<script>alert(1)</script>', '"quoted"', 'line\nbreak', 'tab\there', `5 ${'u'.repeat(3000)}`,
  ),
  fc.string({ maxLength: 12 }),
  fc.tuple(hostileNumber, fc.constantFrom('', ' ', '  '), fc.constantFrom('s', 'us', 'Hz', 'MHz', 'pA', 'A', 'V', 'fA/rtHz', 'ueV', 'mK', 'deg', 'rad', 'meV/ns', 'kHz', 'xyz'))
    .map(([n, sp, u]) => `${n}${sp}${u}`),
);

const leaf = fc.oneof(hostileNumber, hostileString, fc.boolean(), fc.constant(null));

/** Any value, including lists and mappings a few levels deep, with odd keys. */
export const hostileValue: fc.Arbitrary<unknown> = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: 'small', withCrossShrink: true }, leaf, leaf, tie('list'), tie('map')),
  list: fc.array(tie('value'), { maxLength: 4 }),
  map: fc.dictionary(fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom('__proto__', 'constructor', 'name', 'value', 'fixed', 're', 'im')), tie('value'), { maxKeys: 4 }),
})).value;

/** Keys to add: near misses of real keys, prototype names, random text. */
const extraKey = fc.oneof(
  fc.constantFrom('__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', 'Name', 'sampleRat', 'sampleRates',
    'windows', 'lifetme', 'treshold', 'carier', 'unit ', ' name', '', '0', 'extra', 'k'.repeat(3000)),
  fc.string({ maxLength: 10 }),
  fc.constantFrom(...Object.keys(scenarioShape)),
);

const pathOf = (base: unknown) => fc.constantFrom(...allPaths(base));

/** Replace the value at a path by a hostile one. */
export const replaceValue = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.tuple(pathOf(base), hostileValue).map(([path, value]) => ({
    label: `set ${JSON.stringify(path)} = ${safeJson(value)}`,
    apply: (doc) => setAt(doc, path, structuredCloneSafe(value)),
  }));

/** Delete the key (or list entry) at a path. */
export const deleteKey = (base: unknown): fc.Arbitrary<Mutation> =>
  pathOf(base).map((path) => ({
    label: `delete ${JSON.stringify(path)}`,
    apply: (doc) => {
      const parent = parentOf(doc, path);
      if (Array.isArray(parent)) parent.splice(Number(path[path.length - 1]), 1);
      else if (parent) delete (parent as Record<Key, unknown>)[path[path.length - 1]!];
    },
  }));

/** Add an extra key to a mapping (the top level or a nested one). */
export const addKey = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.tuple(fc.constantFrom<Key[]>([], ...allPaths(base).filter((p) => isMapping(getAt(base, p)))), extraKey, hostileValue)
    .map(([path, key, value]) => ({
      label: `add ${JSON.stringify([...path, key])} = ${safeJson(value)}`,
      apply: (doc) => {
        const target = path.length === 0 ? doc : getAt(doc, path);
        if (isMapping(target)) Object.defineProperty(target, key, { value: structuredCloneSafe(value), enumerable: true, writable: true, configurable: true });
      },
    }));

/** Scale the number inside a value (plain or "number unit") by 10^k, flip its sign, or zero it. */
export const scaleNumber = (base: unknown, powers = fc.integer({ min: -40, max: 40 })): fc.Arbitrary<Mutation> =>
  fc.tuple(fc.constantFrom(...numericPaths(base)), powers, fc.constantFrom('scale', 'scale', 'scale', 'negate', 'zero')).map(([path, k, how]) => ({
    label: `${how} ${JSON.stringify(path)}${how === 'scale' ? ` by 1e${k}` : ''}`,
    apply: (doc) => {
      const v = getAt(doc, path);
      const f = (x: number) => (how === 'zero' ? 0 : how === 'negate' ? -x : x * 10 ** k);
      if (typeof v === 'number') setAt(doc, path, f(v));
      else if (typeof v === 'string') {
        const m = NUMBER_IN_TEXT.exec(v);
        if (m) setAt(doc, path, `${f(Number(m[1]))}${m[2]}`);
      }
    },
  }));

/** Replace the unit of a quantity by another (right or wrong dimension, unknown). */
export const swapUnit = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.tuple(fc.constantFrom(...numericPaths(base)), fc.constantFrom('', 's', 'ms', 'us', 'ns', 'Hz', 'kHz', 'MHz', 'GHz', 'A', 'pA', 'nA', 'V', 'mV', 'uV',
    'fA/rtHz', 'nV/rtHz', 'A/sqrt(Hz)', 'ueV', 'meV', 'J', 'K', 'mK', 'deg', 'rad', 'Ohm', 'meV/ns', 'meV/us', '1/s', 'Hz^2', 'furlong', 'MHZ', 'Us')).map(([path, unit]) => ({
    label: `unit of ${JSON.stringify(path)} → ${JSON.stringify(unit)}`,
    apply: (doc) => {
      const v = getAt(doc, path);
      const m = typeof v === 'string' ? NUMBER_IN_TEXT.exec(v) : typeof v === 'number' ? NUMBER_IN_TEXT.exec(String(v)) : null;
      if (m) setAt(doc, path, unit ? `${m[1]} ${unit}` : Number(m[1]));
    },
  }));

/** Wrap a value in lists or mappings, up to `maxDepth` levels. */
export const wrapValue = (base: unknown, maxDepth = 80): fc.Arbitrary<Mutation> =>
  fc.tuple(pathOf(base), fc.integer({ min: 1, max: maxDepth }), fc.boolean()).map(([path, depth, asList]) => ({
    label: `wrap ${JSON.stringify(path)} in ${depth} ${asList ? 'lists' : 'mappings'}`,
    apply: (doc) => {
      let v = getAt(doc, path);
      for (let i = 0; i < depth; i++) v = asList ? [v] : { value: v };
      setAt(doc, path, v);
    },
  }));

/** Duplicate or drop entries of the lists (states, transitions, pipelines). */
export const resizeList = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.tuple(fc.constantFrom(...allPaths(base).filter((p) => Array.isArray(getAt(base, p)))), fc.integer({ min: 0, max: 70 })).map(([path, n]) => ({
    label: `resize ${JSON.stringify(path)} to ${n}`,
    apply: (doc) => {
      const list = getAt(doc, path);
      if (!Array.isArray(list) || list.length === 0) return;
      const copy = Array.from({ length: n }, (_, i) => structuredClone(list[i % list.length]));
      setAt(doc, path, copy);
    },
  }));

/** Any mutation. */
export const anyMutation = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.oneof(replaceValue(base), replaceValue(base), deleteKey(base), addKey(base), scaleNumber(base), scaleNumber(base),
    swapUnit(base), wrapValue(base), resizeList(base));

/** Mutations that often keep a scenario valid (numbers scaled within a few decades, units kept). */
export const mildMutation = (base: unknown): fc.Arbitrary<Mutation> =>
  fc.oneof(scaleNumber(base, fc.integer({ min: -3, max: 3 })), scaleNumber(base, fc.integer({ min: -12, max: 12 })), deleteKey(base));

/** A base document (by name) and a few mutations of it. */
export const mutatedDoc = (mutation: (base: unknown) => fc.Arbitrary<Mutation>, maxMutations = 4) =>
  fc.constantFrom(...BASE_NAMES).chain((name) =>
    fc.array(mutation(BASES[name]), { minLength: 1, maxLength: maxMutations }).map((ms) => {
      const doc = structuredClone(BASES[name]);
      for (const m of ms) m.apply(doc);
      return { base: name, doc, labels: ms.map((m) => m.label) };
    }));

/** Paths whose value holds a number (plain, or at the start of a string). */
export function numericPaths(base: unknown): Key[][] {
  return allPaths(base).filter((p) => {
    const v = getAt(base, p);
    return typeof v === 'number' || (typeof v === 'string' && NUMBER_IN_TEXT.test(v));
  });
}

function isMapping(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

/** structuredClone that keeps own `__proto__` keys as data (they come from parsed documents too). */
function structuredCloneSafe<T>(v: T): T {
  if (Array.isArray(v)) return v.map(structuredCloneSafe) as T;
  if (isMapping(v)) {
    const out: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) Object.defineProperty(out, k, { value: structuredCloneSafe(x), enumerable: true, writable: true, configurable: true });
    return out as T;
  }
  return v;
}

/** JSON for labels, short, NaN/Infinity spelled out. */
export function safeJson(v: unknown): string {
  const text = (JSON.stringify(v, (_k, x) => (typeof x === 'number' && !Number.isFinite(x) ? `\u0000${x}\u0000` : x)) ?? String(v))
    .replace(/"\\u0000(.*?)\\u0000"/g, '$1');
  return text.length > 120 ? `${text.slice(0, 117)}...` : text;
}

/** Paths to every non-finite number inside a value (NaN, ±∞), e.g. ["timing", "sampleRate"]. */
export function nonFiniteNumbers(value: unknown, path: string = ''): string[] {
  if (typeof value === 'number') return Number.isFinite(value) ? [] : [`${path || '(root)'} = ${value}`];
  if (ArrayBuffer.isView(value)) {
    const out: string[] = [];
    const arr = value as unknown as ArrayLike<number>;
    for (let i = 0; i < arr.length && out.length < 5; i++) if (typeof arr[i] === 'number' && !Number.isFinite(arr[i])) out.push(`${path}[${i}] = ${arr[i]}`);
    return out;
  }
  if (value !== null && typeof value === 'object') {
    return Object.entries(value).flatMap(([k, v]) => nonFiniteNumbers(v, path ? `${path}.${k}` : k));
  }
  return [];
}

/** Top-level keys a message's key path may start with: the schema's, or the document's own. */
function knownFirstKeys(doc: unknown): Set<string> {
  return new Set([...Object.keys(scenarioShape), ...(isMapping(doc) ? Object.keys(doc) : [])]);
}

/**
 * Checks an InputError from `file`: one line, starts with "FILE: " (and "FILE: PATH: " when it
 * names a key), the path starts with a key of the schema or of the document, and the message
 * carries no leaked internals. Several problems at once (InputErrors): each is such an error,
 * the message is their lines (at most MAX_REPORTED_ERRORS, then one line counting the rest), and
 * no line is repeated. Returns a description of the first problem, or null.
 */
export function inputErrorProblem(e: unknown, file: string, doc: unknown): string | null {
  if (!(e instanceof InputError)) {
    return `threw ${e instanceof Error ? `${e.name}: ${e.message}\n${e.stack}` : String(e)} instead of an InputError`;
  }
  if (e instanceof InputErrors) {
    if (e.errors.length < 2) return `InputErrors of ${e.errors.length} problem(s)`;
    for (const one of e.errors) {
      const problem = inputErrorProblem(one, file, doc);
      if (problem) return problem;
    }
    const lines = e.errors.slice(0, MAX_REPORTED_ERRORS).map((x) => x.message);
    const more = e.errors.length - MAX_REPORTED_ERRORS;
    if (more > 0) lines.push(`${file}: ${more} more problem${more === 1 ? '' : 's'} not shown`);
    if (e.message !== lines.join('\n')) return `InputErrors message is not its problems' lines: ${JSON.stringify(e.message)}`;
    if (new Set(lines).size !== lines.length) return `a problem reported twice: ${JSON.stringify(e.message)}`;
    if (e.file !== file || e.path !== e.errors[0]!.path) return 'InputErrors does not name its first problem';
    return null;
  }
  const m = e.message;
  if (/[\r\n]/.test(m)) return `message has a line break: ${JSON.stringify(m)}`;
  if (e.file !== file) return `error names file ${JSON.stringify(e.file)}, expected ${JSON.stringify(file)}`;
  const prefix = e.path ? `${file}: ${e.path}: ` : `${file}: `;
  if (!m.startsWith(prefix)) return `message ${JSON.stringify(m)} does not start with ${JSON.stringify(prefix)}`;
  if (e.path) {
    const first = /^([^.[]+)|^\["((?:[^"\\]|\\.)*)"\]/.exec(e.path);
    const key = first ? (first[1] ?? JSON.parse(`"${first[2]}"`)) : '';
    const known = knownFirstKeys(doc);
    // messages cut long keys to 37 characters and "..."
    const cut = key.length === 40 && key.endsWith('...') ? key.slice(0, 37) : null;
    if (!known.has(key) && !(cut !== null && [...known].some((k) => k.startsWith(cut)))) return `path ${JSON.stringify(e.path)} starts with ${JSON.stringify(key)}, not a key of the schema or the document`;
  }
  // user text is quoted in messages; outside the quotes, no sign of a value printed raw
  const unquoted = m.replace(/"(?:[^"\\]|\\.)*"/g, '""');
  if (/\[object |\bundefined\b/.test(unquoted)) return `message leaks internals: ${JSON.stringify(m)}`;
  if (m.length > 600) return `message is ${m.length} characters long`;
  return null;
}

/**
 * Invariants of a resolved scenario that the engine relies on. Returns the first broken one, or
 * null: every number finite, probabilities in [0, 1], the prepared mixture summing to 1,
 * positive rates and times, the window inside the record.
 */
export function scenarioProblem(s: Scenario): string | null {
  const bad = nonFiniteNumbers(s);
  if (bad.length > 0) return `non-finite numbers in the Scenario: ${bad.join(', ')}`;
  const t = s.timing;
  if (!(t.sampleRate > 0 && t.recordLength > 0 && t.windowLength > 0 && t.windowStart >= 0 && t.shotPeriod >= t.recordLength * (1 - 1e-9))) {
    return `timing out of range: ${JSON.stringify(t)}`;
  }
  if (t.windowStart + t.windowLength > t.recordLength * (1 + 1e-9)) return `window outside the record: ${JSON.stringify(t)}`;
  const total = s.prepare.reduce((a, b) => a + b, 0);
  if (Math.abs(total - 1) > 1e-9 || s.prepare.some((p) => p < 0)) return `prepare ${JSON.stringify(s.prepare)} is not a distribution`;
  for (const f of [...s.preparationError, ...s.mappingError]) {
    if (f && !(f.probability >= 0 && f.probability <= 1)) return `flip probability ${f.probability} outside [0, 1]`;
  }
  if (s.transitions.some((tr) => !(tr.rate > 0))) return 'a transition rate ≤ 0';
  if (!(s.shots >= 1 && s.calibrationShots >= 2 && s.batchSize >= 1024)) return `shot counts ${s.shots}/${s.calibrationShots}/${s.batchSize}`;
  if (s.outcomes.length !== 2) return `${s.outcomes.length} outcomes`;
  return null;
}
