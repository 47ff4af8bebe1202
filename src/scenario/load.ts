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
    return decodeScenarioBytes(await readFile(path), path);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(path, '', 'a scenario file', 'no such file');
    if (code === 'EACCES' || code === 'EPERM') throw new InputError(path, '', 'a readable scenario file', 'no permission to read it');
    throw e;
  }
}

/**
 * Decodes scenario file bytes as UTF-8 (a byte-order mark is allowed). Bytes that are not
 * UTF-8 are refused with their offset instead of being replaced by U+FFFD without a word.
 */
export function decodeScenarioBytes(bytes: Uint8Array, file: string): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    // the first offending byte ends the longest prefix that still reads as (unfinished) UTF-8
    let lo = 0, hi = bytes.length;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      try {
        new TextDecoder('utf-8', { fatal: true }).decode(bytes.subarray(0, mid), { stream: true });
        lo = mid;
      } catch {
        hi = mid - 1;
      }
    }
    if (lo >= bytes.length) throw new InputError(file, '', 'UTF-8 text', 'a UTF-8 character cut off at the end of the file');
    // report the lead byte of an unfinished sequence rather than the byte that interrupted it
    let at = lo;
    let j = lo - 1;
    while (j >= 0 && j >= lo - 3 && (bytes[j]! & 0xc0) === 0x80) j--;
    if (j >= 0 && j >= lo - 3 && (bytes[j]! & 0xc0) === 0xc0) {
      const need = bytes[j]! >= 0xf0 ? 4 : bytes[j]! >= 0xe0 ? 3 : 2;
      if (lo - j < need) at = j;
    }
    throw new InputError(file, '', 'UTF-8 text', `a byte that is not UTF-8 (0x${bytes[at]!.toString(16).padStart(2, '0')} at byte ${at})`);
  }
}

/** Parses a document's overrides, canonical JSON and resolution (no file access). */
export function loadScenarioDocument(parsed: unknown, file: string, overrides: ScenarioOverrides = {}): LoadedScenario {
  const doc = applyOverrides(parsed, overrides);
  const canonical = canonicalJson(doc);
  const { scenario, warnings } = resolveScenario(doc, file);
  return { doc, canonical, scenario, warnings };
}

/** What `loadScenarioFile` does after reading the file: parse, override, resolve. */
export function loadScenarioText(text: string, file: string, overrides: ScenarioOverrides = {}): LoadedScenario {
  return loadScenarioDocument(parseScenarioText(text, file), file, overrides);
}

/** Reads, parses, overrides and resolves a scenario file. Problems are `InputError`s. */
export async function loadScenarioFile(path: string, overrides: ScenarioOverrides = {}): Promise<LoadedScenario> {
  return loadScenarioText(await readScenarioText(path), path, overrides);
}
