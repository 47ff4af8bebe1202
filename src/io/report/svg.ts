/**
 * vega-lite spec → SVG text, headless: compile to vega, run a view with no renderer and ask it
 * for SVG. Data is always inline; the view's loader refuses every load, so rendering never
 * touches the network or the disk. The libraries are loaded on first use (they take a moment
 * to import and only the report needs them).
 */
import type { TopLevelSpec } from 'vega-lite';
import { PLOT_CONFIG } from './theme.ts';

/** A vega-lite specification as plain data (the builders in plots.ts make them). */
export type PlotSpec = Record<string, unknown>;

/** Messages vega-lite gave while compiling (a clean plot has none). */
export interface RenderedPlot {
  svg: string;
  warnings: string[];
}

/**
 * Gives every id in an SVG a per-plot prefix and a sequence number, and rewrites the
 * references to them, so that several SVGs inline in one page never share an id and the
 * output does not depend on how many views were rendered before.
 */
export function renumberIds(svg: string, prefix: string): string {
  const ids = new Map<string, string>();
  for (const m of svg.matchAll(/\sid="([^"]+)"/g)) if (!ids.has(m[1]!)) ids.set(m[1]!, `${prefix}${ids.size + 1}`);
  if (ids.size === 0) return svg;
  const swap = (id: string) => ids.get(id) ?? id;
  return svg
    .replace(/(\sid=")([^"]+)(")/g, (_m, a: string, id: string, b: string) => a + swap(id) + b)
    .replace(/url\(#([^)]+)\)/g, (_m, id: string) => `url(#${swap(id)})`)
    .replace(/((?:xlink:)?href=")#([^"]+)(")/g, (_m, a: string, id: string, b: string) => `${a}#${swap(id)}${b}`);
}

/** Renders one plot to SVG; `idPrefix` keeps its ids apart from other plots on the page. */
export async function renderPlot(spec: PlotSpec, idPrefix: string): Promise<RenderedPlot> {
  const vega = await import('vega');
  const { compile } = await import('vega-lite');
  const warnings: string[] = [];
  const note = (...args: unknown[]) => { warnings.push(args.map(String).join(' ')); };
  const logger = vegaLogger(note);
  const compiled = compile({ config: PLOT_CONFIG, ...spec } as unknown as TopLevelSpec, { logger }).spec;
  const loader = vega.loader();
  const refuse = () => Promise.reject(new Error('the report loads nothing: plot data must be inline'));
  loader.load = refuse;
  loader.sanitize = refuse;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', loader, logLevel: vega.Warn, logger });
  try {
    const svg = await view.toSVG();
    return { svg: renumberIds(svg, idPrefix), warnings };
  } finally {
    view.finalize();
  }
}

/** A vega logger that collects warnings and errors. */
function vegaLogger(note: (...args: unknown[]) => void) {
  let level = 0;
  const self = {
    level(l?: number) {
      if (l === undefined) return level;
      level = l;
      return self;
    },
    error: (...a: unknown[]) => { note(...a); return self; },
    warn: (...a: unknown[]) => { note(...a); return self; },
    info: () => self,
    debug: () => self,
  };
  return self as never;
}
