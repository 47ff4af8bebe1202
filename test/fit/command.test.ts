/**
 * `singleshot fit` on the command line: records in a NumPy file with no attributes (so the sample
 * rate comes from the option and the window, unit and carrier are said to be missing), and wrong
 * input — no sample rate anywhere, records too short for one Welch segment, one level only, no
 * noise, labels of the wrong length, an option that is not a quantity — refused with one line and exit
 * 2, no stack trace and no file written.
 */
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { makeStream } from '../../src/random/streams.ts';
import { runCli } from '../support/cli.ts';
import { writeNpy } from '../support/npy-file.ts';

const work = mkdtempSync(join(tmpdir(), 'singleshot-fit-cli-'));
const ROWS = 300;

/** Baseband records: level 0 or `separation` (alternating with the label), white noise of σ per sample. */
function writeRecords(name: string, samples: number, separation: number, sigma = 1): string {
  const stream = makeStream(41, 0, 'aux', 0);
  const x = new Float64Array(ROWS * samples);
  stream.fillNormals(x, 0, x.length);
  for (let i = 0; i < x.length; i++) x[i]! *= sigma;
  for (let r = 0; r < ROWS; r++) for (let k = 0; k < samples; k++) x[r * samples + k]! += (r % 2) * separation;
  const path = join(work, name);
  writeNpy(path, x, [ROWS, samples]);
  return path;
}

function writeLabels(name: string, count: number): string {
  const path = join(work, name);
  writeNpy(path, Int32Array.from({ length: count }, (_, r) => r % 2), [count]);
  return path;
}

let good = '', labels = '';
beforeAll(() => {
  good = writeRecords('good.npy', 256, 1);
  labels = writeLabels('labels.npy', ROWS);
});

/** Runs the command and checks it refused in one line with exit 2 and wrote nothing (`existed`: the file was there before and stays as it was). */
async function refused(args: string[], out: string, pattern: RegExp, existed = false) {
  const before = existed ? readFileSync(out, 'utf8') : null;
  const r = await runCli(['fit', ...args, '--out', out]);
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trim().split('\n');
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(pattern);
  expect(r.stderr).not.toMatch(/\n\s+at /);
  if (existed) expect(readFileSync(out, 'utf8')).toBe(before);
  else expect(existsSync(out)).toBe(false);
}

describe('singleshot fit', () => {
  it('fits records that carry no attributes, says what was missing, and writes a scenario the parser accepts', async () => {
    const out = join(work, 'twin.yaml');
    const r = await runCli(['fit', good, '--labels', labels, '--sample-rate', '2 MHz', '--out', out, '--resamples', '4']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^note: window: not given .* the twin integrates the whole record$/m);
    expect(r.stdout).toMatch(/^note: unit: not given .* plain numbers$/m);
    expect(r.stdout).toMatch(/^note: carrier: none found/m);
    expect(r.stdout).toMatch(`scenario written to ${out}`);
    const { scenario } = loadScenarioText(readFileSync(out, 'utf8'), out);
    expect(scenario.timing.sampleRate).toBe(2e6);
    expect(scenario.signal.unit).toBe('');
    // the levels the records were made with: 0 and 1 (σ = 1 per sample, 256 × 150 samples each: ± 0.005)
    expect(Math.abs(scenario.states[0]!.level.re)).toBeLessThan(0.03);
    expect(Math.abs(scenario.states[1]!.level.re - 1)).toBeLessThan(0.03);
    expect(existsSync(join(work, 'twin.html'))).toBe(true);
    // a second run does not overwrite without --force
    await refused([good, '--sample-rate', '2 MHz'], out, /twin\.yaml: expected a scenario file that does not exist yet \(or --force to replace it\), found an existing file/, true);
  }, 60_000);

  it('refuses records without a sample rate anywhere', async () => {
    await refused([good], join(work, 'a.yaml'), /good\.npy: sample rate: expected a sample rate: --sample-rate, or a sample_rate attribute in the file, found neither$/);
  });

  it('refuses records too short for one Welch segment', async () => {
    await refused([writeRecords('short.npy', 16, 1), '--sample-rate', '1 MHz'], join(work, 'b.yaml'), /short\.npy: expected records of at least 32 samples \(one segment of the noise spectrum\), found 16 samples$/);
  });

  it('refuses records of a single level', async () => {
    await refused([writeRecords('flat.npy', 256, 0), '--sample-rate', '1 MHz'], join(work, 'c.yaml'), /flat\.npy: expected records that show two levels .*, found one level: two levels fit no better than one/);
  });

  it('refuses records without noise (there is no spectrum to fit)', async () => {
    await refused([writeRecords('clean.npy', 256, 1, 0), '--sample-rate', '1 MHz'], join(work, 'f.yaml'), /clean\.npy: expected records with noise .*, found records without any noise$/);
  });

  it('refuses labels of the wrong length', async () => {
    await refused([good, '--sample-rate', '1 MHz', '--labels', writeLabels('short-labels.npy', ROWS - 1)], join(work, 'd.yaml'),
      /short-labels\.npy: expected one label per record \(300 records in .*good\.npy\), found 299 labels$/);
  });

  it('refuses an option that is not a quantity', async () => {
    await refused([good, '--sample-rate', 'fast'], join(work, 'e.yaml'), /--sample-rate takes a quantity like "50 MHz", found "fast"/);
  });
});
