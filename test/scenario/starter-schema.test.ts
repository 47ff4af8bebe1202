import { describe, expect, it } from 'vitest';
import { starterScenario } from '../../src/scenario/starter.ts';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import { scenarioJsonSchema } from '../../src/scenario/json-schema.ts';
import { scenarioShape } from '../../src/scenario/schema.ts';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';

type Schema = Record<string, unknown>;

const KEYWORDS = new Set([
  '$schema', 'title', 'description', 'type', 'properties', 'required', 'additionalProperties', 'items',
  'anyOf', 'enum', 'const', 'minimum', 'maximum', 'exclusiveMinimum', 'minItems', 'minLength', 'pattern',
  'propertyNames', 'examples',
]);

function typeOf(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'array';
  if (typeof v === 'number') return Number.isInteger(v) ? 'integer' : 'number';
  return typeof v;
}

/**
 * Problems of `value` against `schema`, for the subset of JSON Schema 2020-12 that the
 * generated schema uses (an unknown keyword is itself reported, so the subset cannot drift).
 */
function validate(schema: Schema, value: unknown, at = '$'): string[] {
  for (const k of Object.keys(schema)) if (!KEYWORDS.has(k)) return [`${at}: schema uses unsupported keyword ${k}`];
  const out: string[] = [];
  if (schema.anyOf) {
    const ok = (schema.anyOf as Schema[]).some((s) => validate(s, value, at).length === 0);
    if (!ok) out.push(`${at}: matches no anyOf branch`);
  }
  if (schema.type !== undefined) {
    const types = ([] as string[]).concat(schema.type as string);
    const t = typeOf(value);
    if (!types.includes(t) && !(t === 'integer' && types.includes('number'))) return [`${at}: ${t} is not ${types.join('|')}`];
  }
  if (schema.enum && !(schema.enum as unknown[]).includes(value)) out.push(`${at}: not in enum`);
  if ('const' in schema && schema.const !== value) out.push(`${at}: not the const`);
  if (typeof value === 'number') {
    if (typeof schema.minimum === 'number' && value < schema.minimum) out.push(`${at}: below minimum`);
    if (typeof schema.maximum === 'number' && value > schema.maximum) out.push(`${at}: above maximum`);
    if (typeof schema.exclusiveMinimum === 'number' && value <= schema.exclusiveMinimum) out.push(`${at}: not above exclusiveMinimum`);
  }
  if (typeof value === 'string') {
    if (typeof schema.minLength === 'number' && value.length < schema.minLength) out.push(`${at}: too short`);
    if (typeof schema.pattern === 'string' && !new RegExp(schema.pattern, 'u').test(value)) out.push(`${at}: does not match pattern`);
  }
  if (Array.isArray(value)) {
    if (typeof schema.minItems === 'number' && value.length < schema.minItems) out.push(`${at}: too few items`);
    if (schema.items) value.forEach((v, i) => out.push(...validate(schema.items as Schema, v, `${at}[${i}]`)));
  }
  if (typeOf(value) === 'object') {
    const obj = value as Record<string, unknown>;
    const props = (schema.properties ?? {}) as Record<string, Schema>;
    for (const r of (schema.required ?? []) as string[]) if (!(r in obj)) out.push(`${at}: missing ${r}`);
    for (const [k, v] of Object.entries(obj)) {
      if (props[k]) out.push(...validate(props[k]!, v, `${at}.${k}`));
      else if (schema.additionalProperties === false) out.push(`${at}: unknown key ${k}`);
      else if (typeof schema.additionalProperties === 'object') out.push(...validate(schema.additionalProperties as Schema, v, `${at}.${k}`));
    }
  }
  return out;
}

describe('starterScenario', () => {
  it('resolves without errors or warnings', () => {
    const { scenario, warnings } = resolveScenario(parseScenarioText(starterScenario(), 'starter.yaml'), 'starter.yaml');
    expect(warnings).toEqual([]);
    expect(scenario.states.map((s) => s.name)).toEqual(['empty', 'loaded']);
  });

  it('is commented YAML and mentions how to check it', () => {
    const text = starterScenario();
    expect(text.split('\n').filter((l) => l.trim().startsWith('#')).length).toBeGreaterThan(5);
    expect(text).toContain('singleshot check');
  });

  it('has an analytic error near 1e-3 (mean over the two prepared states)', () => {
    // Rough budget, common practice, no source: noise Q(SNR/2) with σ² = S/(2τ) at baseband,
    // relaxation ≈ τ/(2·T1) for T1 ≫ τ, plus the preparation and mapping probabilities.
    const { scenario: s } = resolveScenario(parseScenarioText(starterScenario(), 's'), 's');
    const tau = s.timing.windowLength;
    const t1 = 1 / s.transitions[0]!.rate;
    const loaded = tau / (2 * t1) + s.mappingError[1]!.probability;
    const empty = s.preparationError[0]!.probability;
    const mean = (loaded + empty) / 2;
    expect(mean, `mean error ${mean}`).toBeGreaterThan(3e-4);
    expect(mean, `mean error ${mean}`).toBeLessThan(3e-3);
  });
});

describe('scenarioJsonSchema', () => {
  const schema = scenarioJsonSchema();

  it('is a draft 2020-12 schema of a strict mapping with every top-level key', () => {
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    expect(schema.type).toBe('object');
    expect(schema.additionalProperties).toBe(false);
    expect(Object.keys(schema.properties as object).sort()).toEqual(Object.keys(scenarioShape).sort());
    expect(schema.required).toEqual(['name', 'timing', 'states']);
    expect(JSON.parse(JSON.stringify(schema))).toEqual(schema);
  });

  it('accepts the starter scenario', () => {
    expect(validate(schema, parseScenarioText(starterScenario(), 's'))).toEqual([]);
  });

  it('refuses an unknown key, a wrong type and too few states', () => {
    const doc = parseScenarioText(starterScenario(), 's') as Record<string, unknown>;
    expect(validate(schema, { ...doc, colour: 'red' })).toEqual(['$: unknown key colour']);
    expect(validate(schema, { ...doc, shots: 'many' })).toEqual(['$.shots: string is not integer']);
    expect(validate(schema, { ...doc, states: [(doc.states as unknown[])[0]] })).toEqual(['$.states: too few items']);
  });

  it('accepts every bad fixture that is only wrong in units or across keys (the schema checks shape only)', () => {
    const dir = join(import.meta.dirname, '..', 'fixtures', 'bad-scenarios');
    for (const f of ['wrong-unit.yaml', 'window-too-long.yaml', 'duplicate-state-name.yaml']) {
      expect(validate(schema, parseScenarioText(readFileSync(join(dir, f), 'utf8'), f)), f).toEqual([]);
    }
    expect(readdirSync(dir).length).toBeGreaterThan(12);
  });
});
