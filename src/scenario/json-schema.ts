/**
 * JSON Schema of the scenario file, for editors (YAML language servers read it too).
 */
import { z } from 'zod';
import { scenarioSchema } from './schema.ts';

/**
 * The JSON Schema (draft 2020-12) of what a scenario file may contain. It describes the
 * input form (quantities are numbers or strings with units); unit and cross-field checks are
 * only done by `resolveScenario`.
 */
export function scenarioJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(scenarioSchema, { io: 'input', unrepresentable: 'any', target: 'draft-2020-12' });
}
