/**
 * Report safety: report.html made from a scenario whose user strings (name, description,
 * outcome labels, pipeline names) carry HTML and script loads nothing from the network and
 * shows those strings only escaped: no raw user markup, no extra <script> element, no event
 * handler attribute, no http(s) resource.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';

const base = mkdtempSync(join(tmpdir(), 'singleshot-report-safety-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));

const HOSTILE = {
  name: '<script>alert("name")</script>',
  description: '"><img src=x onerror=alert(1)> & <iframe src="https://example.invalid/x"></iframe>',
  outcome0: '<b onmouseover=alert(0)>zero</b>',
  outcome1: "</script><script>alert('one')</script>",
};

function scenarioText(h: typeof HOSTILE | null): string {
  const q = (s: string) => JSON.stringify(s);
  return [
    `name: ${q(h ? h.name : 'plain name')}`,
    `description: ${q(h ? h.description : 'plain description')}`,
    'seed: 3',
    'shots: 2048',
    'calibrationShots: 1024',
    'batchSize: 1024',
    'timing: { sampleRate: 10 MHz, recordLength: 2 us }',
    'states:',
    `  - { name: low, level: 0 pA, outcome: ${q(h ? h.outcome0 : 'zero')} }`,
    `  - { name: high, level: 100 pA, outcome: ${q(h ? h.outcome1 : 'one')} }`,
    'transitions: [{ from: high, to: low, lifetime: 40 us }]',
    'signal: { noise: { white: { density: 10 fA/rtHz } } }',
    'pipelines:',
    '  - { name: first-pipe }',
    '  - { name: _second, threshold: optimal }',
    '',
  ].join('\n');
}

let hostileHtml = '';
let plainHtml = '';

beforeAll(async () => {
  for (const [kind, h] of [['hostile', HOSTILE], ['plain', null]] as const) {
    const file = join(base, `${kind}.yaml`);
    writeFileSync(file, scenarioText(h));
    const out = join(base, kind);
    const r = await runToDirectory({ scenarioPath: file, outDir: out, free: { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 } });
    const html = readFileSync(r.report ?? join(out, 'report.html'), 'utf8');
    if (kind === 'hostile') hostileHtml = html;
    else plainHtml = html;
  }
}, 60_000);

/** Every place the page would fetch something: src/href/action/poster, CSS url() and @import. */
function resourceLoads(html: string): string[] {
  const out: string[] = [];
  for (const m of html.matchAll(/\b(src|href|action|poster|data|srcset|xlink:href)\s*=\s*("[^"]*"|'[^']*'|[^\s>]+)/gi)) out.push(`${m[1]}=${m[2]}`);
  for (const m of html.matchAll(/url\(\s*([^)]*)\)/gi)) out.push(`url(${m[1]})`);
  for (const m of html.matchAll(/@import\s+[^;]+/gi)) out.push(m[0]);
  return out;
}

describe('report.html with hostile user strings', () => {
  it('loads nothing from the network (no http(s) src/href/url/@import; SVG namespaces aside)', () => {
    const remote = resourceLoads(hostileHtml).filter((r) => /^[^=(]*[=(]\s*["']?\s*(https?:)?\/\//i.test(r));
    expect(remote).toEqual([]);
    const stray = [...hostileHtml.matchAll(/https?:\/\/[^\s"'<>)]*/gi)].map((m) => m[0]).filter((u) => !/^http:\/\/www\.w3\.org\//.test(u));
    // user text may mention a URL, but only as escaped text, never as markup
    for (const u of stray) expect(u, 'a URL in the page must come from escaped user text').toContain('example.invalid');
    expect(hostileHtml).not.toMatch(/<iframe/i);
  });

  it.each(Object.entries(HOSTILE))('the %s string never appears raw', (_key, value) => {
    expect(hostileHtml.includes(value), value).toBe(false);
  });

  it('user strings add no element, script or event handler', () => {
    const count = (html: string, re: RegExp) => (html.match(re) ?? []).length;
    expect(count(hostileHtml, /<script\b/gi)).toBe(count(plainHtml, /<script\b/gi));
    expect(count(hostileHtml, /<img\b/gi)).toBe(count(plainHtml, /<img\b/gi));
    expect(count(hostileHtml, /<b\b/gi)).toBe(count(plainHtml, /<b\b/gi));
    expect(hostileHtml).not.toMatch(/<[^>]*\son(error|mouseover|load)\s*=/i);
  });

  it('the strings are still shown, escaped', () => {
    expect(hostileHtml).toMatch(/&lt;script&gt;alert\((&quot;|&#34;|&#x22;|")name(&quot;|&#34;|&#x22;|")\)&lt;\/script&gt;/);
  });
});
