#!/usr/bin/env node
// Opens singleshot reports in headless Chromium with the network blocked and checks them as a
// reader's browser sees them: no console errors, no page errors, no failed or outgoing
// requests, no script run (no dialog), every plot rendered (an SVG with marks and axes), the
// histogram's legend covering no bar (bounding boxes compared), the assignment matrix (rows
// summing to 1), the IQ-plane scatter with its decision line for a scenario with complex levels
// on a carrier, a scenario named <script>alert(1)</script> shown as text, and the report of an
// analysis of recorded traces (`analyze` on a run's kept records). Saves a full-page screenshot
// of each report.
//
// Usage: node test/browser/check-report.mjs [--screenshot FILE.png] [--work DIR] [--report FILE.html ...]
// Without --report it makes three small runs and an analysis first (a sweep, a hostile name, an IQ scenario, recorded traces) in --work
// (default: a fresh temporary folder). Needs /usr/bin/chromium (Debian's package) and the
// playwright-core dev dependency (which drives it; it downloads no browser).
import { chromium } from 'playwright-core';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, mkdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const HOSTILE = '<script>alert(1)</script>';

function parseArgs(argv) {
  const o = { reports: [], screenshot: null, work: null, chromium: '/usr/bin/chromium' };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--report') o.reports.push(resolve(argv[++i]));
    else if (a === '--screenshot') o.screenshot = resolve(argv[++i]);
    else if (a === '--work') o.work = resolve(argv[++i]);
    else if (a === '--chromium') o.chromium = argv[++i];
    else throw new Error(`unknown argument ${a}`);
  }
  return o;
}

/** Runs the CLI; throws with its output when it fails. */
function singleshot(args) {
  execFileSync(process.execPath, [join(root, 'bin', 'singleshot.js'), ...args], { cwd: root, stdio: ['ignore', 'ignore', 'pipe'] });
}

/** Two run folders: the demo sweep (few shots) and a scenario with a hostile name. */
function makeRuns(work) {
  const sweepDir = join(work, 'sweep');
  singleshot(['run', 'scenarios/demo-sweep.yaml', '--out', sweepDir, '--force', '--quiet', '--shots', '4096']);
  const demo = readFileSync(join(root, 'scenarios', 'demo.yaml'), 'utf8');
  const hostileFile = join(work, 'hostile.yaml');
  const named = demo
    .replace(/^name: .*$/m, `name: ${JSON.stringify(HOSTILE)}`)
    .replace(/^description: .*$/m, `description: ${JSON.stringify(`a "quoted" & <b>bold</b> description ${HOSTILE}`)}`);
  writeFileSync(hostileFile, named);
  const hostileDir = join(work, 'hostile');
  singleshot(['run', hostileFile, '--out', hostileDir, '--force', '--quiet', '--shots', '4096']);
  const iqDir = join(work, 'iq');
  singleshot(['run', 'test/fixtures/scenarios/iq-carrier.yaml', '--out', iqDir, '--force', '--quiet']);
  // an analysis of recorded traces: a run's kept records through analyze, then report
  const recordedDir = join(work, 'recorded');
  singleshot(['run', 'test/fixtures/scenarios/small.yaml', '--out', recordedDir, '--force', '--quiet', '--no-report', '--keep-traces', 'raw']);
  const analysisDir = join(work, 'analysis');
  singleshot(['analyze', join(recordedDir, 'traces.arrow'), '--labels', 'intended_outcome', '--out', analysisDir, '--force']);
  singleshot(['report', analysisDir]);
  return [join(sweepDir, 'report.html'), join(hostileDir, 'report.html'), join(iqDir, 'report.html'), join(analysisDir, 'report.html')];
}

const results = [];
function check(name, ok, detail = '') {
  results.push({ name, ok, detail });
  process.stdout.write(`${ok ? 'ok  ' : 'FAIL'} ${name}${detail ? ` — ${detail}` : ''}\n`);
}

async function inspect(context, file, screenshot) {
  const page = await context.newPage();
  const consoleErrors = [], pageErrors = [], outgoing = [], failed = [], dialogs = [];
  page.on('console', (m) => { if (m.type() === 'error' || m.type() === 'warning') consoleErrors.push(`${m.type()}: ${m.text()}`); });
  page.on('pageerror', (e) => pageErrors.push(String(e)));
  page.on('request', (r) => { if (!r.url().startsWith('file:')) outgoing.push(r.url()); });
  page.on('requestfailed', (r) => failed.push(`${r.url()} (${r.failure()?.errorText})`));
  page.on('dialog', (d) => { dialogs.push(d.message()); d.dismiss().catch(() => {}); });
  await page.setViewportSize({ width: 1100, height: 900 });
  await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
  await page.waitForTimeout(200);
  const facts = await page.evaluate(() => {
    const figures = [...document.querySelectorAll('figure')].map((f) => {
      const svg = f.querySelector('svg');
      const box = svg ? svg.getBoundingClientRect() : { width: 0, height: 0 };
      return {
        title: f.querySelector('h3')?.textContent ?? '',
        hasSvg: !!svg, width: Math.round(box.width), height: Math.round(box.height),
        marks: svg ? svg.querySelectorAll('path, rect, line, text').length : 0,
        axes: svg ? svg.querySelectorAll('.role-axis').length : 0,
        axisLabels: svg ? svg.querySelectorAll('.role-axis-label text').length : 0,
      };
    });
    const box = (e) => { const r = e.getBoundingClientRect(); return { left: r.left, right: r.right, top: r.top, bottom: r.bottom }; };
    // the histogram: its legend's box against every bar's box
    const histogram = [...document.querySelectorAll('figure')].find((f) => (f.querySelector('h3')?.textContent ?? '').startsWith('Histogram'));
    const legend = histogram?.querySelector('svg .role-legend');
    const bars = histogram ? [...histogram.querySelectorAll('svg .mark-rect.role-mark path')].map(box) : [];
    // the IQ plane: its points and its decision line
    const iq = [...document.querySelectorAll('figure')].find((f) => (f.querySelector('h3')?.textContent ?? '').startsWith('IQ plane'));
    const iqLine = iq ? [...iq.querySelectorAll('svg .mark-line.role-mark path')].map((p) => ({ d: (p.getAttribute('d') ?? '').length, ...box(p) })) : [];
    // the assignment matrix: a table whose header has "reported" columns
    const matrix = [...document.querySelectorAll('table')].find((t) => [...t.querySelectorAll('th')].some((th) => th.textContent.startsWith('reported ')));
    const matrixRows = matrix ? [...matrix.querySelectorAll('tbody tr')].map((tr) => {
      const cells = [...tr.querySelectorAll('td')].map((td) => td.textContent);
      const visible = box(tr);
      return { state: cells[0], fractions: cells.slice(2).map(Number), height: visible.bottom - visible.top };
    }) : [];
    return {
      histogram: histogram ? { legend: legend ? box(legend) : null, bars } : null,
      iq: iq ? {
        points: iq.querySelectorAll('svg .mark-symbol.role-mark path').length, line: iqLine,
        cloud: iq.querySelector('svg .mark-symbol.role-mark') ? box(iq.querySelector('svg .mark-symbol.role-mark')) : null,
      } : null,
      matrix: matrix ? { rows: matrixRows, header: [...matrix.querySelectorAll('th')].map((th) => th.textContent) } : null,
      title: document.title, h1: document.querySelector('h1')?.textContent ?? '',
      lede: document.querySelector('.lede')?.textContent ?? '',
      scripts: document.scripts.length, figures,
      pageWidth: document.documentElement.scrollWidth, pageHeight: document.documentElement.scrollHeight,
      caution: document.querySelector('.caution')?.textContent ?? '',
    };
  });
  const label = file.split('/').slice(-2).join('/');
  check(`${label}: no console errors or warnings`, consoleErrors.length === 0, consoleErrors.join('; '));
  check(`${label}: no page errors`, pageErrors.length === 0, pageErrors.join('; '));
  check(`${label}: no outgoing requests`, outgoing.length === 0, outgoing.join(', '));
  check(`${label}: no failed requests`, failed.length === 0, failed.join(', '));
  check(`${label}: no script ran (no dialog, no script element)`, dialogs.length === 0 && facts.scripts === 0, `${dialogs.length} dialogs, ${facts.scripts} scripts`);
  check(`${label}: has plots`, facts.figures.length >= 3, `${facts.figures.length} figures`);
  for (const f of facts.figures) {
    check(`${label}: plot "${f.title}" rendered with axes`, f.hasSvg && f.width > 100 && f.height > 50 && f.marks > 10 && f.axes > 0 && f.axisLabels > 0,
      `${f.width}×${f.height} px, ${f.marks} marks, ${f.axes} axes, ${f.axisLabels} axis labels`);
  }
  if (facts.histogram) {
    const { legend, bars } = facts.histogram;
    const overlaps = legend ? bars.filter((b) => b.left < legend.right && b.right > legend.left && b.top < legend.bottom && b.bottom > legend.top) : [];
    check(`${label}: the histogram's legend covers no bar`, legend !== null && bars.length > 10 && overlaps.length === 0,
      legend ? `${bars.length} bars, ${overlaps.length} under the legend (${Math.round(legend.left)}–${Math.round(legend.right)} × ${Math.round(legend.top)}–${Math.round(legend.bottom)} px)` : 'no legend found');
  } else check(`${label}: has a histogram`, false);
  const m = facts.matrix;
  check(`${label}: assignment matrix shown, each row summing to 1`,
    m !== null && m.rows.length >= 2 && m.rows.every((r) => r.height > 0 && r.fractions.length >= 2 && r.fractions.every((x) => x >= 0 && x <= 1) && Math.abs(r.fractions.reduce((a, b) => a + b, 0) - 1) < 2e-3),
    m ? m.rows.map((r) => `${r.state}: ${r.fractions.join(' + ')}`).join('; ') : 'no table with "reported" columns');
  check(`${label}: caution about SPAM figures present`, /full thresholded statistics/.test(facts.caution) && /no substitute for measured|measured on the records against their labels/.test(facts.caution));
  if (screenshot) {
    mkdirSync(dirname(screenshot), { recursive: true });
    await page.screenshot({ path: screenshot, fullPage: true });
    process.stdout.write(`screenshot: ${screenshot} (${facts.pageWidth}×${facts.pageHeight} px page)\n`);
  }
  await page.close();
  return facts;
}

async function main() {
  const o = parseArgs(process.argv.slice(2));
  const work = o.work ?? mkdtempSync(join(tmpdir(), 'singleshot-browser-'));
  const reports = o.reports.length > 0 ? o.reports : makeRuns(work);
  const profile = mkdtempSync(join(tmpdir(), 'singleshot-chromium-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: o.chromium, headless: true, offline: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run', '--disable-extensions'],
  });
  try {
    // every request that is not the report file itself is refused
    await context.route('**/*', (route) => (route.request().url().startsWith('file:') ? route.continue() : route.abort('blockedbyclient')));
    for (let i = 0; i < reports.length; i++) {
      const shot = i === 0 ? (o.screenshot ?? join(work, 'report.png')) : o.screenshot ? o.screenshot.replace(/(\.png)?$/, `-${i + 1}.png`) : join(work, `report-${i + 1}.png`);
      const facts = await inspect(context, reports[i], shot);
      if (o.reports.length === 0 && i === 2) {
        const iq = facts.iq;
        // the line's box (unclipped) must cross the box of the points: the line runs between the clouds
        const l = iq?.line[0], c = iq?.cloud;
        const crosses = l && c && l.left < c.right && l.right > c.left && l.top < c.bottom && l.bottom > c.top;
        check('IQ scenario: the IQ-plane scatter is drawn, with its decision line through the clouds',
          iq !== null && iq.points >= 400 && iq.line.length === 1 && l.d > 10 && Boolean(crosses),
          iq ? `${iq.points} points, ${iq.line.length} decision line${crosses ? ' crossing the clouds' : ' away from the clouds'}` : 'no IQ figure');
        check('IQ scenario: the assignment matrix has a row per prepared state', facts.matrix?.rows.map((r) => r.state).join(',') === 'ground,excited',
          JSON.stringify(facts.matrix?.rows.map((r) => r.state)));
      }
      if (o.reports.length === 0 && i === 3) {
        check('analysis of recorded traces: the histogram by labelled outcome, the IQ plane, records and their noise spectrum',
          ['Histogram by labelled outcome', 'IQ plane', 'Records', 'Noise spectrum'].every((t) => facts.figures.some((f) => f.title.startsWith(t))),
          facts.figures.map((f) => f.title).join('; '));
        check('analysis of recorded traces: the assignment matrix has a row per labelled outcome', facts.matrix?.rows.map((r) => r.state).join(',') === 'labelled 0,labelled 1',
          JSON.stringify(facts.matrix?.rows.map((r) => r.state)));
      }
      if (o.reports.length === 0 && i === 1) {
        check('hostile name shown as text in the title and heading', facts.title.includes(HOSTILE) && facts.h1 === HOSTILE, `title ${JSON.stringify(facts.title)}, h1 ${JSON.stringify(facts.h1)}`);
        check('hostile description shown as text', facts.lede.includes('<b>bold</b>') && facts.lede.includes(HOSTILE));
        const raw = readFileSync(reports[i], 'utf8');
        check('hostile name escaped in the file', !raw.includes(HOSTILE) && raw.includes('&lt;script&gt;alert(1)&lt;/script&gt;'));
      }
    }
  } finally {
    await context.close();
    rmSync(profile, { recursive: true, force: true });
  }
  const failedCount = results.filter((r) => !r.ok).length;
  process.stdout.write(`browser: ${results.length - failedCount} passed, ${failedCount} failed\n`);
  process.exitCode = failedCount === 0 ? 0 : 1;
}

main().catch((e) => {
  process.stderr.write(`${e.stack ?? e}\n`);
  process.exitCode = 1;
});
