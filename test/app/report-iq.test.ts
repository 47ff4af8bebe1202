/**
 * The report's IQ plane, assignment matrix, carrier zoom and histogram labels, on an invented
 * scenario with complex levels on a carrier (test/fixtures/scenarios/iq-carrier.yaml): the
 * scatter's points are the shots' (I, Q), the decision line is where the projection equals the
 * threshold, the matrix is the summary table's, and without a shots table the re-simulated I
 * and Q belong to the same shots as the histogram's values.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runToDirectory, type RunToDirectoryResult } from '../../src/app/run-to-directory.ts';
import { buildReport } from '../../src/app/report.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { resimulatedValues } from '../../src/engine/trace/examples.ts';
import { IQ_POINTS, iqView, type PointModel, type PointReading } from '../../src/io/report/point-views.ts';
import { readPointIq, readAssignment } from '../../src/io/report/read-point.ts';
import { showValue } from '../../src/io/report/display.ts';

const FIXTURE = 'test/fixtures/scenarios/iq-carrier.yaml';
const dir = mkdtempSync(join(tmpdir(), 'singleshot-report-iq-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let run: RunToDirectoryResult;
let page = '';
beforeAll(async () => {
  run = await runToDirectory({ scenarioPath: FIXTURE, outDir: join(dir, 'run'), force: true, engine: 'auto' });
  page = (await buildReport(join(dir, 'run'))).html;
}, 60_000);

/** A compiled model with only what iqView reads. */
function model(quadrature: boolean): PointModel {
  return {
    scenario: { states: [{ name: 'a', level: { re: 0, im: 0 }, outcome: 0 }, { name: 'b', level: { re: 1e-10, im: 0 }, outcome: 1 }], signal: { unit: 'A' } } as unknown as PointModel['scenario'],
    grid: { samples: 10, sampleRate: 1e6, windowLo: 0, windowHi: 10 },
    pipelines: [{ referencePhase: 0, kernels: { inPhase: new Float64Array(10), quadrature: quadrature ? new Float64Array(10) : null, lo: 0, hi: 10 } }],
    waveforms: [], chain: { rate: new Float64Array(4) }, channels: 1,
  };
}

describe('the IQ plane', () => {
  const reading: PointReading = { pipeline: 0, axisAngle: Math.PI / 3, threshold: 4e-11, sigma: 1e-11 };
  const cloud = (n: number, i0: number, q0: number) => ({
    inPhase: Float64Array.from({ length: n }, (_, k) => i0 + 1e-12 * Math.sin(k)),
    quadrature: Float64Array.from({ length: n }, (_, k) => q0 + 1e-12 * Math.cos(3 * k)),
  });

  it('draws at most IQ_POINTS per state on equal axes, and the line I·cos α + Q·sin α = threshold', () => {
    const view = iqView(model(true), reading, [cloud(5000, 0, 0), cloud(300, 5e-11, 8e-11)], true)!;
    expect(view.total).toBe(5300);
    expect(view.shown).toBe(Math.ceil(5000 / Math.ceil(5000 / IQ_POINTS)) + 300);
    const spec = view.spec as { layer: { data: { values: { i: number; q: number; state?: string }[] } }[] };
    const points = spec.layer[0]!.data.values;
    expect(points.filter((p) => p.state === 'a').length).toBeLessThanOrEqual(IQ_POINTS);
    const line = spec.layer[1]!.data.values;
    expect(line).toHaveLength(2);
    for (const p of line) expect(p.i * Math.cos(Math.PI / 3) + p.q * Math.sin(Math.PI / 3)).toBeCloseTo(40, 9);   // pA
    const domain = (view.spec as { layer: { encoding: { x: { scale: { domain: number[] } }; y: { scale: { domain: number[] } } } }[] }).layer[0]!.encoding;
    const [x0, x1] = domain.x.scale.domain as [number, number], [y0, y1] = domain.y.scale.domain as [number, number];
    expect(x1 - x0).toBeCloseTo(y1 - y0, 9);
    for (const p of points) expect(p.i >= x0 && p.i <= x1 && p.q >= y0 && p.q <= y1).toBe(true);
  });

  it('has no decision line when the classifier does not decide on (I, Q), and no plane with nothing to draw', () => {
    const view = iqView(model(true), reading, [cloud(10, 0, 0), cloud(10, 1e-10, 0)], false)!;
    expect((view.spec as { layer: unknown[] }).layer).toHaveLength(1);
    expect(iqView(model(false), reading, [cloud(0, 0, 0), cloud(0, 1e-10, 0)], true)).toBeNull();
  });

  it('in the report of a scenario with complex levels on a carrier: the scatter, the zoom on the carrier, the matrix', async () => {
    expect(page).toContain('IQ plane: integrated values by prepared state, with the decision line');
    expect(page).toContain('Dashed: the decision line');
    expect(page).toContain('Raw records, zoom on the carrier');
    expect((page.match(/<svg[^>]*class="marks"/g) ?? []).length).toBe(5);
    // the matrix is summary.arrow's, row by row
    const s = run.result.points[0]!.summaries[0]!;
    for (const st of s.states) {
      const [a, b] = st.assignment.map((x) => (x >= 0.01 ? x.toFixed(4) : x.toExponential(2)));
      expect(page).toContain(`<td class="text">${st.state}</td><td class="text">&quot;${st.state === 'ground' ? '0' : '1'}&quot;</td><td>${a}</td><td>${b}</td>`);
    }
    expect(readAssignment(join(dir, 'run'), 0, 'main', ['ground', 'excited'], ['0', '1'])).toEqual(s.states.map((st) => st.assignment));
  });

  it('reads (I, Q) from shots.arrow whose projection is the decision value', async () => {
    const iq = await readPointIq(join(dir, 'run'), 0, 'main', ['ground', 'excited']);
    expect(iq[0]!.inPhase.length + iq[1]!.inPhase.length).toBe(4096);
    expect(iq.every((v) => v.inPhase.length === v.quadrature.length)).toBe(true);
  });

  it('the histogram shows the threshold value and the bin width', () => {
    const s = run.result.points[0]!.summaries[0]!;
    expect(page).toContain(`threshold ${showValue(s.threshold, 'A')}`);
    expect(page).toMatch(/shots per bin of [\d.]+ pA \(log scale\)/);
  });

  it('without a shots table: the same re-simulated shots give I, Q and the projected values', async () => {
    const bare = await runToDirectory({ scenarioPath: FIXTURE, outDir: join(dir, 'bare'), force: true, shotsTable: false });
    const html = (await buildReport(join(dir, 'bare'))).html;
    expect(html).toContain('shots re-simulated on the point&#39;s auxiliary stream (this run wrote no shots table)');
    const compiled = compilePoint(bare.result.points[0]!.scenario);
    const axis = { cos: Math.cos(0.7), sin: Math.sin(0.7) };
    const i = resimulatedValues(compiled, 0, 0, { cos: 1, sin: 0 }), q = resimulatedValues(compiled, 0, 0, { cos: 0, sin: 1 });
    const v = resimulatedValues(compiled, 0, 0, axis);
    for (let s = 0; s < 2; s++) {
      for (let k = 0; k < v[s]!.length; k += 97) expect(i[s]![k]! * axis.cos + q[s]![k]! * axis.sin).toBeCloseTo(v[s]![k]!, 22);
    }
  }, 60_000);
});
