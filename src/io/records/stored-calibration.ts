/**
 * The calibration `run --keep-traces` stores in the traces table's metadata
 * (`singleshot.calibration`, io/tables/traces.ts), read back for `analyze` with
 * `calibration: stored`: every field checked, the classifier's model decoded (io/plain-data.ts)
 * and checked by its classifier, so a damaged or hand-edited table is one clear line.
 */
import { InputError } from '../../errors.ts';
import { CLASSIFIERS } from '../../classify/registry.ts';
import type { PipelineCalibration } from '../../classify/calibrate.ts';
import { META_PREFIX } from '../metadata.ts';
import { decodeData } from '../plain-data.ts';
import type { StoredCalibration } from '../tables/traces.ts';
import type { RecordSet } from './record-set.ts';

type StoredPipeline = StoredCalibration['pipelines'][number];

const KEY = `metadata ${META_PREFIX}calibration`;

/** What is wrong with one stored pipeline calibration, or null when it is whole. */
function entryProblem(p: unknown): string | null {
  if (p === null || typeof p !== 'object') return 'an entry that is not an object';
  const e = p as Record<string, unknown>;
  const finite = (x: unknown) => typeof x === 'number' && Number.isFinite(x) && Math.abs(x) <= 1e100;
  if (typeof e.name !== 'string' || typeof e.classifier !== 'string') return 'a name and a classifier';
  if (!finite(e.referencePhase) || !finite(e.axisAngle)) return 'finite angles';
  if (!finite(e.threshold)) return 'a finite threshold';
  if (typeof e.highIsOne !== 'boolean') return 'highIsOne true or false';
  if (!finite(e.bandHalfWidth) || (e.bandHalfWidth as number) < 0) return 'a band half-width ≥ 0';
  if (e.weights !== null && !(Array.isArray(e.weights) && e.weights.length > 0 && e.weights.every(finite))) return 'null or finite weights';
  return null;
}

/** The stored calibration of pipeline `name` (the only one when the file names none), with its reference phase. */
export function storedCalibrationOf(records: RecordSet, name: string, named: boolean): { name: string; calibration: PipelineCalibration; referencePhase: number } {
  const path = records.source;
  const text = records.metadata.get(`${META_PREFIX}calibration`);
  let stored: StoredCalibration[] | null = null;
  try {
    stored = text === undefined ? null : (JSON.parse(text) as StoredCalibration[]);
  } catch {
    stored = null;
  }
  if (!stored || !Array.isArray(stored) || stored.length === 0 || !Array.isArray(stored[0]?.pipelines)) {
    throw new InputError(path, KEY, 'a stored calibration (written by run --keep-traces)', 'none');
  }
  const points = records.column('point');
  if (points && points.some((p) => p !== points[0]) && stored.length > 1) {
    throw new InputError(path, 'column "point"', 'records of one sweep point (each point has its own calibration)', 'several points');
  }
  const point = stored.find((s) => s.point === (points?.[0] ?? stored![0]!.point)) ?? stored[0]!;
  const list = point.pipelines as unknown[];
  if (!Array.isArray(list) || list.some((p) => entryProblem(p) !== null)) {
    const bad = Array.isArray(list) ? list.map(entryProblem).find((x) => x !== null) : 'not a list';
    throw new InputError(path, KEY, 'a stored calibration (written by run --keep-traces)', `one that does not read back (${bad ?? 'pipelines'})`);
  }
  const entries = list as StoredPipeline[];
  const found = entries.find((p) => p.name === name) ?? (!named && entries.length === 1 ? entries[0] : undefined);
  if (!found) throw new InputError(path, KEY, `a calibration of pipeline "${name}" (stored: ${entries.map((p) => `"${p.name}"`).join(', ')}); set name in the pipeline file`, 'none');
  const classifier = CLASSIFIERS.find((k) => k.name === found.classifier);
  if (!classifier) throw new InputError(path, KEY, `a known classifier (${CLASSIFIERS.map((k) => k.name).join(', ')})`, `"${found.classifier}"`);
  let model: unknown = null;
  try {
    model = decodeData(found.model ?? null);
  } catch {
    model = undefined;
  }
  const problem = classifier.modelProblem ? classifier.modelProblem(model) : model === null ? null : 'no model';
  if (problem !== null) throw new InputError(path, KEY, `the ${classifier.name} classifier's model of pipeline "${found.name}" with ${problem}`, 'one that does not read back');
  const means = Array.isArray(found.outcomeMeans) && found.outcomeMeans.length === 2 ? found.outcomeMeans : [NaN, NaN];
  return {
    name: found.name,
    referencePhase: found.referencePhase,
    calibration: {
      axis: { cos: Math.cos(found.axisAngle), sin: Math.sin(found.axisAngle) },
      rule: { threshold: found.threshold, highIsOne: found.highIsOne },
      outcomeMeans: [Number(means[0]), Number(means[1])],
      weights: found.weights ? Float64Array.from(found.weights) : null,
      bandHalfWidth: found.bandHalfWidth,
      model,
    },
  };
}
