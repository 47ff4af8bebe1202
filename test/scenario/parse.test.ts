import { describe, expect, it } from 'vitest';
import { parseScenarioText, MAX_ALIAS_COUNT } from '../../src/scenario/parse.ts';
import { applyOverrides } from '../../src/scenario/overrides.ts';
import { canonicalJson } from '../../src/scenario/canonical.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { starterScenario } from '../../src/scenario/starter.ts';
import { InputError } from '../../src/errors.ts';

describe('parseScenarioText', () => {
  it('reads YAML', () => {
    expect(parseScenarioText('a: 1\nb: [x, "2"]\nc: { d: 2 us }\n', 'f')).toEqual({ a: 1, b: ['x', '2'], c: { d: '2 us' } });
  });

  it('reads JSON', () => {
    expect(parseScenarioText('{"a": [1, 2], "b": "3 us"}', 'f')).toEqual({ a: [1, 2], b: '3 us' });
  });

  it('reads YAML 1.2 numbers (1e5 is a number, yes is a string)', () => {
    expect(parseScenarioText('a: 1e5\nb: yes\nc: 0x10\n', 'f')).toEqual({ a: 100000, b: 'yes', c: 16 });
  });

  it('allows a few aliases', () => {
    expect(parseScenarioText('a: &x { b: 1 }\nc: *x\n', 'f')).toEqual({ a: { b: 1 }, c: { b: 1 } });
  });

  it.each([
    ['an empty file', '', /^f\.yaml: expected a scenario \(a YAML or JSON mapping\), found an empty file$/],
    ['only comments', '# nothing\n\n', /found an empty file$/],
    ['a syntax error', 'a: [1, 2\n', /^f\.yaml: expected YAML or JSON, found a syntax error: .*line \d+, column \d+$/],
    ['duplicate keys', 'a: 1\na: 2\n', /found a syntax error: Map keys must be unique/],
    ['tabs as indentation', 'a:\n\t- 1\n', /found a syntax error/],
    ['two documents', 'a: 1\n---\nb: 2\n', /^f\.yaml: expected a single YAML document, found 2 documents/],
  ])('refuses %s', (_what, text, message) => {
    let error: unknown;
    try {
      parseScenarioText(text, 'f.yaml');
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InputError);
    expect((error as InputError).message).toMatch(message);
    expect((error as InputError).path).toBe('');
  });

  it(`refuses a "billion laughs" file (more than ${MAX_ALIAS_COUNT} alias expansions)`, () => {
    // 9 levels of 9 aliases would expand to 9^9 ≈ 3.9e8 strings.
    const lines = ['l0: &l0 [lol, lol, lol, lol, lol, lol, lol, lol, lol]'];
    for (let i = 1; i < 9; i++) lines.push(`l${i}: &l${i} [${new Array(9).fill(`*l${i - 1}`).join(', ')}]`);
    expect(() => parseScenarioText(lines.join('\n'), 'lol.yaml')).toThrow(/^lol\.yaml: expected YAML with at most 100 alias expansions/);
  });
});

describe('applyOverrides', () => {
  it('returns a new object with shots and seed replaced, leaving the input alone', () => {
    const doc = { name: 'x', shots: 10, nested: { a: [1] } };
    const out = applyOverrides(doc, { shots: 99, seed: 5 }) as typeof doc & { seed: number };
    expect(out).toEqual({ name: 'x', shots: 99, seed: 5, nested: { a: [1] } });
    expect(doc).toEqual({ name: 'x', shots: 10, nested: { a: [1] } });
    expect(out.nested).not.toBe(doc.nested);
  });

  it('changes nothing without overrides', () => {
    const doc = { shots: 10 };
    expect(applyOverrides(doc, {})).toEqual(doc);
    expect(applyOverrides(doc, {})).not.toBe(doc);
  });

  it('passes a non-mapping through (resolution reports it)', () => {
    expect(applyOverrides([1, 2], { shots: 3 })).toEqual([1, 2]);
    expect(applyOverrides(null, { seed: 3 })).toBeNull();
  });

  it('overridden values are validated by resolution', () => {
    const doc = applyOverrides(parseScenarioText(starterScenario(), 's'), { shots: 0 });
    expect(() => resolveScenario(doc, 's')).toThrow(/^s: shots: expected an integer ≥ 1, found 0$/);
    const ok = applyOverrides(parseScenarioText(starterScenario(), 's'), { shots: 1234, seed: 42 });
    const { scenario } = resolveScenario(ok, 's');
    expect([scenario.shots, scenario.seed]).toEqual([1234, 42]);
  });
});

describe('canonicalJson', () => {
  it('sorts keys at every level and keeps list order', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: 'x' } })).toBe('{"a":{"c":"x","d":[3,{"y":2,"z":1}]},"b":1}');
  });

  it('gives equal strings for documents that differ only in key order', () => {
    expect(canonicalJson({ x: 1, y: { p: 1, q: 2 } })).toBe(canonicalJson({ y: { q: 2, p: 1 }, x: 1 }));
  });

  it('drops undefined members', () => {
    expect(canonicalJson({ a: undefined, b: [undefined, 1] })).toBe('{"b":[null,1]}');
  });

  it('round-trips: resolving the canonical JSON gives the same Scenario', () => {
    const doc = parseScenarioText(starterScenario(), 'starter.yaml');
    const direct = resolveScenario(doc, 'starter.yaml');
    const again = resolveScenario(JSON.parse(canonicalJson(doc)), 'starter.yaml');
    expect(again).toEqual(direct);
    expect(canonicalJson(JSON.parse(canonicalJson(doc)))).toBe(canonicalJson(doc));
  });
});
