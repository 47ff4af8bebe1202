/**
 * Reading a scenario file: text → document → overrides → canonical JSON → Scenario.
 */
import { readFile, stat } from 'node:fs/promises';
import { InputError } from '../errors.ts';
import type { Scenario } from './types.ts';
import { parseScenarioText } from './parse.ts';
import { applyOverrides, type ScenarioOverrides } from './overrides.ts';
import { canonicalJson } from './canonical.ts';
import { resolveScenario } from './resolve.ts';

/** Largest scenario file read (scenario files are a few kilobytes). */
export const MAX_SCENARIO_BYTES = 4 * 1024 * 1024;

/** A loaded scenario: the document as used (overrides applied), its canonical JSON, the result. */
export interface LoadedScenario {
  doc: unknown;
  canonical: string;
  scenario: Scenario;
  warnings: string[];
}

async function readScenarioText(path: string): Promise<string> {
  try {
    const info = await stat(path);
    if (info.isDirectory()) throw new InputError(path, '', 'a scenario file', 'a directory');
    if (info.size > MAX_SCENARIO_BYTES) {
      throw new InputError(path, '', `a scenario file of at most ${MAX_SCENARIO_BYTES} bytes`, `${info.size} bytes`);
    }
    return await readFile(path, 'utf8');
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(path, '', 'a scenario file', 'no such file');
    if (code === 'EACCES' || code === 'EPERM') throw new InputError(path, '', 'a readable scenario file', 'no permission to read it');
    throw e;
  }
}

/** Reads, parses, overrides and resolves a scenario file. Problems are `InputError`s. */
export async function loadScenarioFile(path: string, overrides: ScenarioOverrides = {}): Promise<LoadedScenario> {
  const text = await readScenarioText(path);
  const doc = applyOverrides(parseScenarioText(text, path), overrides);
  const canonical = canonicalJson(doc);
  const { scenario, warnings } = resolveScenario(doc, path);
  return { doc, canonical, scenario, warnings };
}
