/**
 * `--refine` inside a run: after the grid, golden-section points along one swept value are
 * simulated one after another (each needs the previous result), appended to the run's points
 * with the next point indices (so each has its own seed stream) and streamed to the same
 * shots table. They run on this thread.
 */
import { InputError } from '../errors.ts';
import type { LoadedScenario } from '../scenario/load.ts';
import { runPoints, type RunOptions, type RunResult } from '../run/run-points.ts';
import { inProcessExecutor } from '../run/executor.ts';
import type { SweepPoint } from '../run/sweep-point.ts';
import { DEFAULT_REFINE_POINTS, refineAxis, refineMinimum, type Refinement } from '../run/refine.ts';
import { sweepPointAt } from '../run/sweep.ts';
import { interruptibleExecutor } from '../run/interrupt.ts';

/** What to refine: the swept value (key path or column; true = choose) and how many points to add. */
export interface RefineRequest {
  key: string | true;
  points?: number;
}

/** The refinement of the first pipeline's minimum. */
export interface RefineOutcome extends Refinement {
  pipeline: string;
}

/** Options of the grid run that the refinement points share. */
export interface RefineRunOptions {
  onScoredBatch?: RunOptions['onScoredBatch'];
  onProgress?: RunOptions['onProgress'];
  signal?: AbortSignal;
  shard?: { index: number; count: number };
}

/** Checks a refinement request against the scenario before anything runs. */
export function checkRefineRequest(req: RefineRequest, loaded: LoadedScenario, file: string, shard?: unknown): number {
  const spec = loaded.scenario.sweep;
  if (!spec) throw new InputError('--refine', '', 'a scenario with a sweep section', `${file} sweeps nothing`);
  if (shard) throw new InputError('--refine', '', 'a run of all shots (refinement needs the whole grid result)', '--shard');
  const axis = refineAxis(spec, req.key);
  const keys = spec.axes.map((a) => a.key).join(', ');
  if (axis < 0) throw new InputError('--refine', '', `one of the swept keys (${keys})`, req.key === true ? 'none that can be refined' : JSON.stringify(req.key));
  const a = spec.axes[axis]!;
  if (a.integer) throw new InputError('--refine', '', 'a swept value that can vary continuously', `${a.key} (an integer)`);
  if (new Set(a.values).size < 2) throw new InputError('--refine', '', 'a swept value with at least 2 values', a.key);
  if (spec.combine === 'zip' && spec.axes.length > 1) throw new InputError('--refine', '', 'a grid sweep (zipped values have no line to refine along)', 'combine: zip');
  const n = req.points ?? DEFAULT_REFINE_POINTS;
  if (!Number.isInteger(n) || n < 2 || n > 64) throw new InputError('--refine-points', '', 'a whole number from 2 to 64', String(n));
  return axis;
}

/** Runs the refinement, appending its points to `result.points`. */
export async function refineWithin(
  req: RefineRequest, loaded: LoadedScenario, file: string, points: SweepPoint[], result: RunResult, o: RefineRunOptions,
): Promise<RefineOutcome> {
  const axis = checkRefineRequest(req, loaded, file, o.shard);
  const spec = loaded.scenario.sweep!;
  const pipeline = result.points[0]!.summaries[0]!.pipeline;
  const grid = result.points.map((p) => ({
    point: p.index, values: spec.axes.map((a) => p.parameters[a.column]!), meanError: p.summaries[0]!.meanError,
  }));
  const all: SweepPoint[] = [...points];
  const gridShots = result.points.reduce((s, p) => s + p.summaries[0]!.shots, 0);
  const count = req.points ?? DEFAULT_REFINE_POINTS;
  const refinement = await refineMinimum(spec, grid, axis, count, async (values) => {
    const index = all.length;
    const indices = values.map((v, i) => {
      const k = spec.axes[i]!.values.indexOf(v);
      return k >= 0 ? k : null;
    });
    const point = sweepPointAt(loaded.doc, spec, file, values, indices, `refinement point ${index}`);
    all.push(point);
    const before = gridShots + (index - points.length) * point.scenario.shots;
    const total = gridShots + count * point.scenario.shots;
    const executor = o.signal ? interruptibleExecutor(inProcessExecutor(), o.signal) : inProcessExecutor();
    // the run's engine (a refinement point differs from the grid only in the swept value)
    const r = await runPoints(all, {
      executor, firstPoint: index, onScoredBatch: o.onScoredBatch,
      engine: { engine: result.engine === 'exact' ? 'exact' : 'traces', reason: result.engineReason },
      onProgress: o.onProgress ? (done, _total, phase) => { if (phase === 'simulating') o.onProgress!(before + done, total, phase); } : undefined,
    });
    const p = r.points[0]!;
    result.points.push(p);
    return { point: p.index, meanError: p.summaries[0]!.meanError };
  });
  return { ...refinement, pipeline };
}
