/**
 * Page assembly: the report model (texts, tables, rendered SVG plots) into one self-contained
 * HTML page. No script, no external resource (a content security policy forbids any), print
 * styles for A4. Every user string is escaped by the `html` template tag.
 */
import { html, trusted, type SafeHtml } from './escape.ts';
import { FONT, PALETTE } from './theme.ts';

/** A figure: a rendered plot (SVG from the plotting library) with its caption. */
export interface Figure {
  title: string;
  svg: string;
  caption: string;
  /** Two figures marked `half` in a row sit side by side. */
  half?: boolean;
}

/** A table: header cells and rows of cells (plain text, escaped on output). */
export interface TableView {
  header: string[];
  rows: string[][];
  /** Row indices to highlight (e.g. the operating point). */
  marked?: number[];
  /** Number of leading text columns, aligned left (default 1); the rest are numbers, aligned right. */
  textColumns?: number;
}

/** A section of the page. */
export interface SectionView {
  id: string;
  title: string;
  /** Paragraphs before the figures. */
  intro: string[];
  figures: Figure[];
  tables: { caption: string; table: TableView }[];
  /** A note shown when the section has nothing to plot. */
  note?: string;
}

/** A highlighted answer card. */
export interface Card {
  label: string;
  value: string;
  detail: string[];
}

/** A built page and what the plotting library said while drawing it. */
export interface BuiltReport {
  html: string;
  /** Compiler and renderer warnings (a clean report has none). */
  warnings: string[];
  /** Number of plots drawn. */
  plots: number;
}

/** Everything the page shows. */
export interface ReportPage {
  name: string;
  description: string;
  summaryLine: string;
  facts: [string, string][];
  postSelection: string;
  cards: Card[];
  verdict: string[];
  sections: SectionView[];
  scenarioJson: string;
  /** What the page is of: a simulated run (default) or an analysis of recorded traces. */
  kind?: 'run' | 'analysis';
}

/** The texts that differ between the page of a run and that of an analysis of recorded traces. */
const TEXTS = {
  run: {
    kicker: 'singleshot · simulated single-shot readout',
    caution: 'Simulated fidelities are no substitute for measured ones: they show what this model of the device and the signal chain predicts, nothing more.',
    answer: 'Where to operate',
    footer: 'Made by singleshot from the run\'s tables alone; <code>singleshot report FOLDER</code> rebuilds this page. The scenario as run:',
  },
  analysis: {
    kicker: 'singleshot · analysis of recorded single-shot readout',
    caution: 'These figures are measured on the records against their labels: a preparation error or a wrong label counts as a readout error, and the calibration rows are left out of every figure.',
    answer: 'What the records show',
    footer: 'Made by singleshot from the analysis\'s tables alone; <code>singleshot report FOLDER</code> rebuilds this page. The pipeline as run:',
  },
} as const;

const STYLE = `
:root { --ink: ${PALETTE.ink}; --muted: ${PALETTE.muted}; --paper: ${PALETTE.paper}; --card: ${PALETTE.card};
  --rule: ${PALETTE.rule}; --accent: ${PALETTE.accent}; --caution: ${PALETTE.caution}; --caution-back: ${PALETTE.cautionBack}; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink); font: 15px/1.55 ${FONT}; }
main { max-width: 980px; margin: 0 auto; padding: 28px 28px 56px; }
.masthead { border-bottom: 3px solid var(--accent); padding-bottom: 14px; }
.kicker { text-transform: uppercase; letter-spacing: .14em; font-size: 11px; color: var(--muted); margin: 0; }
h1 { font-size: 27px; line-height: 1.25; margin: 6px 0 6px; overflow-wrap: anywhere; }
.lede { margin: 0 0 10px; color: var(--muted); overflow-wrap: anywhere; }
.facts { display: grid; grid-template-columns: repeat(auto-fill, minmax(200px, 1fr)); gap: 4px 18px; margin: 8px 0 0; font-size: 13px; }
.facts div { display: flex; gap: 6px; }
.facts dt { color: var(--muted); }
.facts dd { margin: 0; font-weight: 600; overflow-wrap: anywhere; }
.summary-line { font-size: 13px; color: var(--muted); margin: 8px 0 0; }
.caution { border-left: 4px solid var(--caution); background: var(--caution-back); padding: 10px 16px; margin: 20px 0 6px; font-size: 14px; }
.caution p { margin: 4px 0; }
h2 { font-size: 19px; margin: 34px 0 10px; padding-bottom: 5px; border-bottom: 1px solid var(--rule); }
h3 { font-size: 14px; margin: 0 0 6px; }
section > p { margin: 6px 0; }
.cards { display: grid; grid-template-columns: repeat(auto-fit, minmax(280px, 1fr)); gap: 14px; margin: 12px 0; }
.card { background: var(--card); border: 1px solid var(--rule); border-top: 3px solid var(--accent); border-radius: 6px; padding: 12px 16px; }
.card .label { font-size: 12px; text-transform: uppercase; letter-spacing: .08em; color: var(--muted); margin: 0; }
.card .value { font-size: 24px; font-weight: 700; margin: 2px 0 4px; font-variant-numeric: tabular-nums; }
.card p { margin: 2px 0; font-size: 13px; overflow-wrap: anywhere; }
.verdict { background: var(--card); border: 1px solid var(--rule); border-radius: 6px; padding: 10px 16px; }
.verdict p { margin: 4px 0; }
.row { display: grid; grid-template-columns: 1fr 1fr; gap: 14px; }
figure { background: var(--card); border: 1px solid var(--rule); border-radius: 6px; padding: 12px 14px 10px; margin: 12px 0; break-inside: avoid; }
.row figure { margin: 0; }
figure svg { display: block; max-width: 100%; height: auto; margin: 0 auto; }
figcaption { font-size: 13px; color: var(--muted); margin-top: 6px; }
.note { font-size: 14px; color: var(--muted); background: var(--card); border: 1px dashed var(--rule); border-radius: 6px; padding: 10px 14px; }
.table-wrap { overflow-x: auto; background: var(--card); border: 1px solid var(--rule); border-radius: 6px; margin: 10px 0; }
table { border-collapse: collapse; font-size: 13px; width: 100%; }
caption { text-align: left; font-size: 13px; color: var(--muted); padding: 8px 10px 4px; }
th, td { padding: 5px 8px; border-bottom: 1px solid var(--rule); text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
th { font-weight: 600; background: #faf9f6; white-space: normal; overflow-wrap: anywhere; vertical-align: bottom; }
th.text, td.text { text-align: left; }
tr.marked td { background: #eef5f3; font-weight: 600; }
footer { margin-top: 40px; font-size: 12px; color: var(--muted); }
footer pre { white-space: pre-wrap; overflow-wrap: anywhere; background: var(--card); border: 1px solid var(--rule); border-radius: 6px; padding: 10px 12px; font-size: 11px; }
@page { size: A4; margin: 14mm; }
@media print {
  body { background: #fff; font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  figure, .card, .verdict, .table-wrap { border-color: #cfcac0; }
  h2 { break-after: avoid; }
  .table-wrap { overflow: visible; }
  th, td { white-space: normal; }
}
@media (max-width: 760px) { .row { grid-template-columns: 1fr; } }
`;

function tableHtml(caption: string, t: TableView): SafeHtml {
  const marked = new Set(t.marked ?? []);
  const left = t.textColumns ?? 1;
  const cls = (j: number) => trusted(j < left ? ' class="text"' : '');
  return html`<div class="table-wrap"><table>${caption ? html`<caption>${caption}</caption>` : ''}<thead><tr>${t.header.map((h, j) => html`<th scope="col"${cls(j)}>${h}</th>`)}</tr></thead><tbody>${
    t.rows.map((r, i) => html`<tr${marked.has(i) ? trusted(' class="marked"') : ''}>${r.map((c, j) => html`<td${cls(j)}>${c}</td>`)}</tr>`)
  }</tbody></table></div>`;
}

function figureHtml(f: Figure): SafeHtml {
  // the SVG comes from the plotting library, which escapes the text it draws
  return html`<figure><h3>${f.title}</h3>${trusted(f.svg)}<figcaption>${f.caption}</figcaption></figure>`;
}

function figuresHtml(figures: readonly Figure[]): SafeHtml[] {
  const out: SafeHtml[] = [];
  for (let i = 0; i < figures.length; i++) {
    const f = figures[i]!, g = figures[i + 1];
    if (f.half && g?.half) {
      out.push(html`<div class="row">${figureHtml(f)}${figureHtml(g)}</div>`);
      i++;
    } else out.push(figureHtml(f));
  }
  return out;
}

function sectionHtml(s: SectionView): SafeHtml {
  return html`<section id="${s.id}"><h2>${s.title}</h2>${s.intro.map((p) => html`<p>${p}</p>`)}${
    s.note ? html`<p class="note">${s.note}</p>` : ''}${figuresHtml(s.figures)}${s.tables.map((t) => tableHtml(t.caption, t.table))}</section>`;
}

/** A whole HTML document around `body`: no script, no external resource (the policy forbids any), the report's style. */
function documentHtml(title: string, body: SafeHtml): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${html`${title}`.html}</title>
<style>${STYLE}</style>
</head>
<body>
${body.html}
</body>
</html>
`;
}

/** The whole page as one HTML string. */
export function renderPage(p: ReportPage): string {
  const t = TEXTS[p.kind ?? 'run'];
  const body = html`<main>
<header class="masthead">
<p class="kicker">${t.kicker}</p>
<h1>${p.name}</h1>
${p.description ? html`<p class="lede">${p.description}</p>` : ''}
<dl class="facts">${p.facts.map(([k, v]) => html`<div><dt>${k}</dt><dd>${v}</dd></div>`)}</dl>
<p class="summary-line">${p.summaryLine}</p>
</header>
<aside class="caution" role="note">
<p><strong>Before quoting a number.</strong> A SPAM figure must come from full thresholded statistics — every scored shot, each assigned by the threshold — and any post-selection must be stated with its discard fraction. ${p.postSelection}</p>
<p>${t.caution}</p>
</aside>
<section id="answer"><h2>${t.answer}</h2>
<div class="cards">${p.cards.map((c) => html`<div class="card"><p class="label">${c.label}</p><p class="value">${c.value}</p>${c.detail.map((d) => html`<p>${d}</p>`)}</div>`)}</div>
<div class="verdict">${p.verdict.map((v) => html`<p>${v}</p>`)}</div>
</section>
${p.sections.map(sectionHtml)}
<footer>
<p>${trusted(t.footer)}</p>
<pre>${p.scenarioJson}</pre>
</footer>
</main>`;
  return documentHtml(`${p.name} · singleshot report`, body);
}

/** A page of sections without the run's caution and answer: the fit report's layout. */
export interface DocumentPage {
  /** The line above the title. */
  kicker: string;
  name: string;
  description: string;
  facts: [string, string][];
  sections: SectionView[];
  /** A sentence before the closing text block, and the block itself (shown as written). */
  footerNote: string;
  footerText: string;
}

/** The whole page of a DocumentPage as one HTML string (the same style and policy as renderPage). */
export function renderDocumentPage(p: DocumentPage): string {
  const body = html`<main>
<header class="masthead">
<p class="kicker">${p.kicker}</p>
<h1>${p.name}</h1>
${p.description ? html`<p class="lede">${p.description}</p>` : ''}
<dl class="facts">${p.facts.map(([k, v]) => html`<div><dt>${k}</dt><dd>${v}</dd></div>`)}</dl>
</header>
${p.sections.map(sectionHtml)}
<footer>
<p>${p.footerNote}</p>
<pre>${p.footerText}</pre>
</footer>
</main>`;
  return documentHtml(`${p.name} · singleshot`, body);
}
