/**
 * The report's look: one calm palette shared by the page and the plots, and the plot config
 * handed to vega-lite. Colours are chosen here and nowhere else.
 */

/** Page and plot colours. */
export const PALETTE = {
  ink: '#22303c',
  muted: '#5b6770',
  faint: '#8d969c',
  paper: '#f7f5f0',
  card: '#ffffff',
  rule: '#e3ded5',
  grid: '#eeeae3',
  accent: '#2f6f78',
  caution: '#8a5a1f',
  cautionBack: '#fbf3e4',
  window: '#e9f0ee',
} as const;

/** One colour per hidden state, in state order (then repeating). */
export const STATE_COLOURS = ['#3b6e8f', '#c0873f', '#6e8b5b', '#8a6a9c', '#a0524a', '#4f8f8c'];

/** Colour of a state by index. */
export function stateColour(i: number): string {
  return STATE_COLOURS[i % STATE_COLOURS.length]!;
}

/** One colour per cause of a wrong shot, and for the total. */
export const CAUSE_COLOURS: Record<string, string> = {
  noise: '#6b7f8e',
  relaxation: '#b4574a',
  excitation: '#8a6a9c',
  leakage: '#6e8b5b',
  preparation: '#3f8c8a',
  mapping: '#c0873f',
  total: '#22303c',
};

/** Colour of a cause (a neutral grey for causes added later without a colour). */
export function causeColour(cause: string): string {
  return CAUSE_COLOURS[cause] ?? '#9a9188';
}

/** Ramp for error maps, from low error (deep teal) to high (pale sand). */
export const ERROR_RAMP = ['#1f4e5a', '#3f7f82', '#8dbab0', '#d8e6d9', '#f6f1e3'];
/** Ramp for SNR maps, from low (pale sand) to high (deep umber). */
export const SNR_RAMP = ['#f6f1e3', '#ead39f', '#cf9e57', '#a2672e', '#623a1b'];

/** Colours of noise spectrum components (the total first). */
export const SPECTRUM_COLOURS = ['#22303c', '#3b6e8f', '#b4574a', '#6e8b5b', '#c0873f', '#8a6a9c'];

/** Font stack used by the page and the plots. */
export const FONT = 'DejaVu Sans, Verdana, Helvetica, Arial, sans-serif';

/** vega-lite config: fonts, sizes and colours of axes, legends and titles. */
export const PLOT_CONFIG = {
  background: PALETTE.card,
  font: FONT,
  padding: 6,
  view: { stroke: PALETTE.rule, strokeWidth: 1 },
  axis: {
    labelColor: PALETTE.muted,
    titleColor: PALETTE.ink,
    labelFontSize: 11,
    titleFontSize: 12,
    titleFontWeight: 'normal',
    titlePadding: 8,
    gridColor: PALETTE.grid,
    domainColor: PALETTE.faint,
    tickColor: PALETTE.faint,
  },
  // y titles read horizontally above the axis (long rotated titles would push the plot down)
  axisY: { titleAngle: 0, titleAlign: 'left', titleBaseline: 'bottom', titleX: -42, titleY: -10 },
  legend: {
    labelColor: PALETTE.ink,
    titleColor: PALETTE.muted,
    labelFontSize: 11,
    titleFontSize: 11,
    titleFontWeight: 'normal',
    symbolStrokeWidth: 2,
    labelLimit: 420,
    titleLimit: 420,
  },
  title: { color: PALETTE.ink, fontSize: 13, fontWeight: 'bold', anchor: 'start', offset: 8 },
  header: { labelColor: PALETTE.ink, labelFontSize: 11, titleFontSize: 11 },
  text: { color: PALETTE.ink, fontSize: 11 },
  line: { strokeWidth: 1.6 },
  point: { filled: true, size: 36 },
} as const;
