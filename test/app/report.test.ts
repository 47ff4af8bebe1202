import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { buildReport, writeReport } from '../../src/app/report.ts';
import { escapeHtml, html, trusted } from '../../src/io/report/escape.ts';
import { renumberIds } from '../../src/io/report/svg.ts';
import { main } from '../../src/cli/main.ts';
import { GRID_3x4, smallScenario } from '../support/sweep-scenarios.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-report-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const HOSTILE = '<script>alert(1)</script>';

describe('escaping', () => {
  it.each([
    ['<script>alert(1)</script>', '&lt;script&gt;alert(1)&lt;/script&gt;'],
    [`"a" & 'b'`, '&quot;a&quot; &amp; &#39;b&#39;'],
    ['plain', 'plain'],
  ])('escapes %j', (text, expected) => {
    expect(escapeHtml(text)).toBe(expected);
    expect(html`<p title="${text}">${text}</p>`.html).toBe(`<p title="${expected}">${expected}</p>`);
  });

  it('passes trusted fragments and lists through, escapes everything else', () => {
    expect(html`${[trusted('<b>'), '<i>']}`.html).toBe('<b>&lt;i&gt;');
    expect(html`${{ html: '<script>' }}`.html).toBe('[object Object]');
  });

  it('renumbers SVG ids and their references per plot', () => {
    const svg = '<svg><clipPath id="clip7"><rect/></clipPath><g clip-path="url(#clip7)"></g><use xlink:href="#clip7"/><g id="x"/></svg>';
    expect(renumberIds(svg, 'p2-')).toBe('<svg><clipPath id="p2-1"><rect/></clipPath><g clip-path="url(#p2-1)"></g><use xlink:href="#p2-1"/><g id="p2-2"/></svg>');
  });
});

describe('report of a swept run', () => {
  const runDir = join(dir, 'run');
  let page = '';
  beforeAll(async () => {
    const file = join(dir, 'grid.yaml');
    writeFileSync(file, smallScenario(GRID_3x4, `${HOSTILE} & "friends"`));
    const r = await runToDirectory({ scenarioPath: file, outDir: runDir, force: true });
    expect(r.report).toBe(join(runDir, 'report.html'));
    page = readFileSync(r.report!, 'utf8');
  }, 60_000);

  it('is one self-contained page: no script, no external resource, a policy that forbids loading', () => {
    expect(page.startsWith('<!doctype html>')).toBe(true);
    expect(page).not.toMatch(/<script/i);
    expect(page).not.toMatch(/(?:src|href)="(?:https?:)?\/\//i);
    expect(page).toContain(`content="default-src 'none'; style-src 'unsafe-inline'; img-src data:"`);
    expect(page).toMatch(/@media print/);
  });

  it('escapes the scenario name everywhere', () => {
    expect(page).not.toContain(HOSTILE);
    expect(page).toContain('<h1>&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;friends&quot;</h1>');
    expect(page).toContain('<title>&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;friends&quot; · singleshot report</title>');
  });

  it('has every plot of a two-value sweep, drawn as SVG by the plotting library, and the caution', async () => {
    const svgs = page.match(/<svg[^>]*class="marks"/g) ?? [];
    // histogram, raw records, demodulated records, two error-vs-value plots, the maps
    expect(svgs).toHaveLength(6);
    expect(page).toContain('role-axis');
    expect(page).toContain('full thresholded statistics');
    expect(page).toContain('no substitute for measured ones');
    expect(page).toContain('Noise spectrum');
    const built = await buildReport(runDir);
    expect(built.warnings).toEqual([]);
  }, 60_000);

  it('rebuilds byte for byte from the tables alone, in another folder', async () => {
    const copy = join(dir, 'copy');
    mkdirSync(copy, { recursive: true });
    for (const f of ['run.json', 'summary.arrow', 'budget.arrow', 'shots.arrow']) copyFileSync(join(runDir, f), join(copy, f));
    const out: string[] = [];
    vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => (out.push(String(c)), true));
    try {
      expect(await main(['node', 'singleshot', 'report', copy])).toBe(0);
    } finally {
      vi.restoreAllMocks();
    }
    expect(out.join('')).toBe(`${join(copy, 'report.html')}\n`);
    expect(readFileSync(join(copy, 'report.html'), 'utf8')).toBe(page);
  }, 60_000);

  it('refuses a folder whose run did not finish', async () => {
    const broken = join(dir, 'broken');
    mkdirSync(broken, { recursive: true });
    for (const f of ['summary.arrow', 'budget.arrow']) copyFileSync(join(runDir, f), join(broken, f));
    const manifest = JSON.parse(readFileSync(join(runDir, 'run.json'), 'utf8'));
    writeFileSync(join(broken, 'run.json'), JSON.stringify({ ...manifest, complete: false }));
    await expect(writeReport(broken)).rejects.toThrow(/complete: expected a finished run, found complete: false/);
    const err: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => (err.push(String(c)), true));
    try {
      expect(await main(['node', 'singleshot', 'report', broken])).toBe(2);
    } finally {
      vi.restoreAllMocks();
    }
    expect(err.join('')).toContain('the run was interrupted');
  });

  it('draws the histogram from re-simulated shots when the run kept no shots table', async () => {
    const bare = join(dir, 'bare');
    mkdirSync(bare, { recursive: true });
    for (const f of ['summary.arrow', 'budget.arrow']) copyFileSync(join(runDir, f), join(bare, f));
    // run.json of a run without shots.arrow (--no-shots-table): it neither lists nor checks one
    const manifest = JSON.parse(readFileSync(join(runDir, 'run.json'), 'utf8'));
    delete manifest.sha256['shots.arrow'];
    writeFileSync(join(bare, 'run.json'), JSON.stringify({ ...manifest, files: manifest.files.filter((f: string) => f !== 'shots.arrow') }));
    const built = await buildReport(bare);
    expect(built.plots).toBe(6);
    expect(built.html).toContain('re-simulated on the point&#39;s auxiliary stream');
  }, 60_000);
});
