// A TypeScript user of the installed package: typechecked against its shipped declarations,
// then run. It checks and runs the demo scenario in code, reads the tables back with
// apache-arrow, and sees a wrong option refused with a message naming it.
import { mkdtempSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { checkScenario, InputError, runScenario, type RunScenarioResult } from 'singleshot';

function expect(ok: boolean, what: string): void {
  if (!ok) throw new Error(`package check (TypeScript): ${what}`);
}

const demo = join(dirname(createRequire(import.meta.url).resolve('singleshot/package.json')), 'scenarios', 'demo.yaml');
const checked = await checkScenario({ scenario: demo });
expect(checked.summary.includes('2 states'), `check's summary: ${checked.summary}`);

const out = mkdtempSync(join(tmpdir(), 'singleshot-ts-'));
const run: RunScenarioResult = await runScenario({ scenario: demo, outDir: out, force: true, report: false });
expect(run.files.includes('summary.arrow') && run.files.includes('shots.arrow'), `files written: ${run.files.join(', ')}`);

const summary = tableFromIPC(readFileSync(join(out, 'summary.arrow')));
const shots = tableFromIPC(readFileSync(join(out, 'shots.arrow')));
const error = Number(summary.getChild('mean_error')?.get(0));
const shotCount = Number(summary.getChild('shots')?.get(0));
expect(summary.numRows === 1, `summary rows: ${summary.numRows}`);
expect(error > 0 && error < 0.5, `mean error ${error}`);
expect(shots.numRows === shotCount, `shots.arrow rows ${shots.numRows} against the summary's ${shotCount} shots`);
expect(run.result.points[0]!.summaries.length >= 1, 'the result has a pipeline summary');

let refused = '';
try {
  // @ts-expect-error: a misspelt option, refused at run time too
  await runScenario({ scenario: demo, outDir: out, force: true, shot: 10 });
} catch (e) {
  if (e instanceof InputError) refused = e.message;
}
expect(/shot/.test(refused), `a misspelt option is refused naming it (got: "${refused}")`);
console.log(`TypeScript: demo run in code, mean error ${error.toExponential(3)} over ${shotCount} shots; a misspelt option refused: ${refused.split('\n')[0]}`);
