/**
 * The report's IQ plane and assignment matrix at the lowest-error point: the integrated (I, Q)
 * of each prepared state (from shots.arrow, or re-simulated on the point's auxiliary stream when
 * the run wrote no shots table) with the decision line, and the fractions of each prepared
 * state reported as each outcome (from summary.arrow).
 */
import { classifierOf } from '../classify/registry.ts';
import type { CompiledPoint } from '../engine/compile-point.ts';
import { resimulatedValues } from '../engine/trace/examples.ts';
import { iqView, type PointReading } from '../io/report/point-views.ts';
import { readAssignment, readPointIq } from '../io/report/read-point.ts';
import { assignmentTable } from '../io/report/tables.ts';
import type { TableView } from '../io/report/page.ts';
import type { PlotSpec } from '../io/report/svg.ts';

/** The IQ figure (null at baseband) and the assignment table of one point and pipeline. */
export async function iqAndAssignment(
  dir: string, hasShots: boolean, compiled: CompiledPoint, point: number, reading: PointReading,
): Promise<{ iq: { spec: PlotSpec; title: string; caption: string } | null; assignment: { caption: string; table: TableView } }> {
  const sc = compiled.scenario;
  const spec = sc.pipelines[reading.pipeline]!;
  const states = sc.states.map((s) => s.name);
  let iq = null;
  if (compiled.pipelines[reading.pipeline]!.kernels.quadrature !== null) {
    // the same re-simulated shots projected on I and on Q give each shot's (I, Q)
    const values = hasShots
      ? await readPointIq(dir, point, spec.name, states)
      : (() => {
        const i = resimulatedValues(compiled, point, reading.pipeline, { cos: 1, sin: 0 });
        const q = resimulatedValues(compiled, point, reading.pipeline, { cos: 0, sin: 1 });
        return i.map((inPhase, s) => ({ inPhase, quadrature: q[s]! }));
      })();
    const kind = classifierOf(spec);
    const decides = !kind.readsBins && kind.signalUnitStatistic;
    const view = iqView(compiled, reading, values, decides);
    if (view) {
      const source = hasShots ? 'scored shots' : 'shots re-simulated on the point\'s auxiliary stream (this run wrote no shots table)';
      iq = {
        spec: view.spec, title: 'IQ plane: integrated values by prepared state, with the decision line',
        caption: `Points: the integrated in-phase (I) and quadrature (Q) values of ${view.shown} of the ${view.total} ${source}, pipeline "${spec.name}"${view.shown < view.total ? ', every k-th shot of each state' : ''}. ${decides
          ? 'Dashed: the decision line, where the value projected on the separation axis equals the threshold; a shot on the side of a state\'s cloud is assigned that state\'s outcome.'
          : `No decision line: the ${kind.name} classifier decides on the record, not on (I, Q).`} Both axes have the same scale.`,
      };
    }
  }
  const matrix = readAssignment(dir, point, spec.name, states, sc.outcomes);
  return {
    iq,
    assignment: {
      caption: `Assignment matrix, pipeline "${spec.name}": the fraction of each prepared state's scored shots reported as each outcome (rows sum to 1; off the correct outcome is the state's error).`,
      table: assignmentTable(states, sc.outcomes, sc.states.map((s) => s.outcome), matrix),
    },
  };
}
