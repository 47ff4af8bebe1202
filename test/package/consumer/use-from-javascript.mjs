// A JavaScript user of the installed package: runs the demo scenario in code (with its report),
// reads the tables back with apache-arrow, and checks the report was written.
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { runScenario } from 'singleshot';

function expect(ok, what) {
  if (!ok) throw new Error(`package check (JavaScript): ${what}`);
}

const demo = join(dirname(createRequire(import.meta.url).resolve('singleshot/package.json')), 'scenarios', 'demo.yaml');
const out = mkdtempSync(join(tmpdir(), 'singleshot-js-'));
const { files, report } = await runScenario({ scenario: demo, outDir: out, force: true });
expect(report !== null && existsSync(report), `report.html written (${report})`);
const summary = tableFromIPC(readFileSync(join(out, 'summary.arrow')));
const budget = tableFromIPC(readFileSync(join(out, 'budget.arrow')));
const snr = Number(summary.getChild('snr')?.get(0));
expect(snr > 1, `SNR ${snr}`);
expect(budget.numRows > 0, 'budget.arrow has rows');
console.log(`JavaScript: demo run in code, SNR ${snr.toFixed(2)}; files ${files.join(', ')}`);
