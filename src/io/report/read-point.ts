/**
 * More of one point for the report: the integrated I and Q of its scored shots, per prepared
 * state, streamed batch by batch from shots.arrow (columns in_phase and quadrature), and its
 * assignment matrix from summary.arrow (columns `<state>_reported_<outcome>`).
 */
import { createReadStream } from 'node:fs';
import { join } from 'node:path';
import { RecordBatchReader } from 'apache-arrow';
import { InputError } from '../../errors.ts';
import { readArrowFile } from '../arrow-read.ts';

/** Integrated I and Q of one point and pipeline from shots.arrow, grouped by prepared state. */
export async function readPointIq(dir: string, point: number, pipeline: string, stateNames: readonly string[]): Promise<{ inPhase: Float64Array; quadrature: Float64Array }[]> {
  const file = join(dir, 'shots.arrow');
  const parts = stateNames.map(() => ({ i: [] as number[], q: [] as number[] }));
  const reader = await RecordBatchReader.from(createReadStream(file));
  for await (const batch of reader) {
    const [pointCol, pipeCol, stateCol, iCol, qCol] = ['point', 'pipeline', 'prepared', 'in_phase', 'quadrature'].map((c) => batch.getChild(c));
    if (!pointCol || !pipeCol || !stateCol || !iCol || !qCol) throw new InputError(file, '', 'the columns point, pipeline, prepared, in_phase and quadrature');
    const points = pointCol.toArray() as Uint32Array;
    const pipeData = pipeCol.data[0]!;
    const wanted = (pipeData.dictionary!.toArray() as string[]).indexOf(pipeline);
    const pipeIdx = pipeData.values as Uint8Array;
    const stateData = stateCol.data[0]!;
    const toState = (stateData.dictionary!.toArray() as string[]).map((s) => stateNames.indexOf(s));
    const stateIdx = stateData.values as Uint8Array;
    const inPhase = iCol.toArray() as Float64Array, quadrature = qCol.toArray() as Float64Array;
    for (let k = 0; k < points.length; k++) {
      if (points[k] !== point || pipeIdx[k] !== wanted) continue;
      const s = toState[stateIdx[k]!]!;
      if (s < 0) continue;
      parts[s]!.i.push(inPhase[k]!);
      parts[s]!.q.push(quadrature[k]!);
    }
  }
  return parts.map((p) => ({ inPhase: Float64Array.from(p.i), quadrature: Float64Array.from(p.q) }));
}

/** matrix[s][o]: the fraction of state s's scored shots reported as outcome o, at one point and pipeline. */
export function readAssignment(dir: string, point: number, pipeline: string, states: readonly string[], outcomes: readonly string[]): number[][] {
  const columns = states.flatMap((st) => outcomes.map((o) => `${st}_reported_${o}`));
  const table = readArrowFile(join(dir, 'summary.arrow'), 'summary', ['point', 'pipeline', ...columns]);
  const points = Array.from(table.getChild('point')!, Number);
  const pipelines = Array.from(table.getChild('pipeline')!, String);
  const row = points.findIndex((p, i) => p === point && pipelines[i] === pipeline);
  if (row < 0) throw new InputError(join(dir, 'summary.arrow'), '', `a row of point ${point}, pipeline "${pipeline}"`, 'none');
  return states.map((st) => outcomes.map((o) => {
    const v = table.getChild(`${st}_reported_${o}`)!.get(row);
    return v === null ? NaN : Number(v);
  }));
}
