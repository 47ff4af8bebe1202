/**
 * singleshot as a library: every command of the CLI is a function here (src/library), taking
 * one options object checked like the command's options (a wrong name or type is an
 * InputError naming the option) and with the command's defaults (`DEFAULTS`), so the same
 * scenario, seed and options give the same tables from code and from the command line.
 */
export { runScenario, type RunScenarioOptions, type RunScenarioResult } from './library/run.ts';
export { checkScenario, type CheckScenarioOptions, type CheckScenarioResult } from './library/check.ts';
export { analyzeRecords, type AnalyzeRecordsOptions, type AnalyzeRecordsResult } from './library/analyze.ts';
export { fitTwin, type FitTwinOptions, type FitTwinResult } from './library/fit.ts';
export { mergeRunFolders, type MergeRunFoldersOptions, type MergeRunFoldersResult } from './library/merge.ts';
export { rerunFolder, type RerunFolderOptions, type RerunFolderResult } from './library/rerun.ts';
export { writeRunReport, type WriteRunReportOptions, type WriteRunReportResult } from './library/report.ts';
export type { RecordsOptions } from './library/records-options.ts';
export type { ScenarioDocument } from './library/scenario-input.ts';
export { DEFAULTS, ENGINES, type EngineName } from './library/defaults.ts';
export { runPoints, type RunResult, type RunPhase } from './run/run-points.ts';
export { inProcessExecutor, type BatchExecutor } from './run/executor.ts';
export { RunInterrupted } from './run/interrupt.ts';
export type { RunEstimate } from './run/estimate.ts';
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
export { InputError, InputErrors, ScenarioProblem } from './errors.ts';
export { main } from './cli/main.ts';
