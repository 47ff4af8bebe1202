/** `checkScenario`: validate a scenario as `run` would before simulating — the `check` command as a function. */
import { z } from 'zod';
import { checkScenarioDocument, checkScenarioFile, type CheckedScenario } from '../app/check.ts';
import { readOptions } from './options.ts';
import { scenarioOption, scenarioSource, type ScenarioDocument } from './scenario-input.ts';

/** The options of `checkScenario`. */
export interface CheckScenarioOptions {
  /**
   * The scenario: a file path (YAML or JSON), or the document itself as a plain object (what a
   * scenario file holds); messages name an object `(scenario object)`. Required.
   */
  scenario: string | ScenarioDocument;
}

/** A checked scenario: the document as used, its points (one per sweep point), warnings, and a one-line summary. */
export type CheckScenarioResult = CheckedScenario;

const schema: z.ZodType<CheckScenarioOptions> = z.strictObject({ scenario: scenarioOption });

/**
 * Checks a scenario — the document and every point of its sweep — as `run` does before it
 * simulates. Problems are `InputError`s naming the file (or `(scenario object)`) and key path;
 * warnings are in `loaded.warnings`.
 */
export async function checkScenario(options: CheckScenarioOptions): Promise<CheckScenarioResult> {
  const o = readOptions('checkScenario', schema, options);
  const source = scenarioSource(o.scenario);
  return source.document === undefined ? checkScenarioFile(source.path) : checkScenarioDocument(source.document, source.path);
}
