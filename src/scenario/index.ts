/**
 * The scenario layer: file text → validated document → resolved `Scenario` (SI units).
 */
export type * from './types.ts';
export { parseScenarioText, MAX_ALIAS_COUNT } from './parse.ts';
export { applyOverrides, type ScenarioOverrides } from './overrides.ts';
export { resolveScenario } from './resolve.ts';
export { canonicalJson } from './canonical.ts';
export { loadScenarioFile, type LoadedScenario } from './load.ts';
export { scenarioJsonSchema } from './json-schema.ts';
export { starterScenario } from './starter.ts';
export { describeScenario } from './summary.ts';
export { formatQuantity, parseQuantity, parseUnit, DIMENSIONS, type DimensionName, type Quantity } from './units.ts';
