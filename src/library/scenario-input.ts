/**
 * A scenario given to the library: a file path, or the document itself as a plain object (what
 * a scenario file holds). A document must be plain data — mappings, lists, strings, finite
 * numbers, booleans and null, nested at most as deep as a file may be — and messages name it
 * `(scenario object)`.
 */
import { z } from 'zod';
import { InputError } from '../errors.ts';
import { MAX_NESTING } from '../scenario/parse.ts';
import { formatPath } from '../scenario/issues.ts';

/** The name messages give a scenario passed as an object. */
export const SCENARIO_OBJECT = '(scenario object)';

/** A scenario document as a plain object: the mapping a YAML or JSON scenario file holds. */
export type ScenarioDocument = Record<string, unknown>;

function isMapping(v: unknown): v is Record<string, unknown> {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) return false;
  const proto = Object.getPrototypeOf(v);
  return proto === Object.prototype || proto === null;
}

/** The `scenario` option: a file path or a document. */
export const scenarioOption = z.union([
  z.string(),
  z.custom<ScenarioDocument>(isMapping),
], { error: 'a scenario file path (string) or a scenario document (a plain object)' });

/** Refuses what is not plain data in a document, naming the key. */
function checkPlain(v: unknown, path: (string | number)[], open: Set<object>): void {
  const fail = (found: string) => { throw new InputError(SCENARIO_OBJECT, formatPath(path), 'plain data (a mapping, list, string, finite number, boolean or null)', found); };
  if (v === null || typeof v === 'string' || typeof v === 'boolean') return;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) fail(String(v));
    return;
  }
  if (typeof v !== 'object') fail(v === undefined ? 'undefined' : `a ${typeof v}`);
  if (path.length >= MAX_NESTING) throw new InputError(SCENARIO_OBJECT, '', `a document nested at most ${MAX_NESTING} levels deep`, 'more levels');
  const o = v as object;
  if (open.has(o)) fail('a value that contains itself');
  if (!Array.isArray(o) && !isMapping(o)) fail(`an object (${o.constructor?.name ?? 'no class'})`);
  open.add(o);
  if (Array.isArray(o)) o.forEach((x, i) => checkPlain(x, [...path, i], open));
  else for (const [k, x] of Object.entries(o)) checkPlain(x, [...path, k], open);
  open.delete(o);
}

/** A scenario as the use cases take it: the file's path, or the checked document and its name. */
export type ScenarioSource = { path: string; document?: undefined } | { path: string; document: ScenarioDocument };

/** The scenario option as a path (a file) or a checked document named SCENARIO_OBJECT. */
export function scenarioSource(scenario: string | ScenarioDocument): ScenarioSource {
  if (typeof scenario === 'string') return { path: scenario };
  checkPlain(scenario, [], new Set());
  return { path: SCENARIO_OBJECT, document: scenario };
}
