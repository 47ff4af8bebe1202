/**
 * singleshot as a library: every command of the CLI is a function here.
 */
export { runToDirectory, type RunToDirectoryOptions, type RunToDirectoryResult } from './app/run-to-directory.ts';
export { checkScenarioFile, checkScenarioDocument, type CheckedScenario } from './app/check.ts';
export { reportFolder, type ReportOptions } from './app/report.ts';
export { mergeRuns, type MergeOptions } from './app/merge.ts';
export { rerunDirectory, type RerunOptions } from './app/rerun.ts';
export { analyzeToDirectory, type AnalyzeOptions } from './app/recorded/analyze.ts';
export { runPoints, type RunResult } from './run/run-points.ts';
export { inProcessExecutor, type BatchExecutor } from './run/executor.ts';
export type { PointResult } from './run/point-result.ts';
export type { SweepPoint } from './run/sweep-point.ts';
export { compilePoint, type CompiledPoint } from './engine/compile-point.ts';
export { simulateBatch, type ShotBatch } from './engine/trace/batch.ts';
export { loadScenarioFile } from './scenario/load.ts';
export { parseScenarioText } from './scenario/parse.ts';
export { resolveScenario } from './scenario/resolve.ts';
export { canonicalJson } from './scenario/canonical.ts';
export { scenarioJsonSchema } from './scenario/json-schema.ts';
export { starterScenario } from './scenario/starter.ts';
export type { Scenario } from './scenario/types.ts';
export { analyticBudget, type Budget } from './analysis/budget.ts';
export { barthelErrors } from './analysis/barthel.ts';
export { gaussianTail } from './analysis/special.ts';
export { wilsonInterval, clopperPearsonInterval } from './analysis/intervals.ts';
export { resultToJson } from './app/result-json.ts';
export { fitToScenario, type FitOptions, type FitResult } from './app/recorded/fit.ts';
export { InputError, ScenarioProblem } from './errors.ts';
export { main } from './cli/main.ts';
