/**
 * The noise-spectrum plot, drawn when the run folder holds a noise table (`noise.arrow`: one
 * row per component and frequency, columns `component`, `frequency` in Hz and `psd`, the
 * one-sided power spectral density with its unit in the field metadata). Without one the
 * report shows a note instead; this file is the hook for the noise model's own table.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { readArrowFile } from '../arrow-read.ts';
import { spectrumSpec } from './plots.ts';
import type { PlotSpec } from './svg.ts';

/** File name of the noise table the report looks for. */
export const NOISE_TABLE = 'noise.arrow';

/** The spectrum plot and its caption, or a note saying why there is none; only a table run.json lists (`listed`) is read. */
export function noiseSpectrumView(
  dir: string, listed: boolean, caption = 'One-sided power spectral density of each noise component as the scenario describes it, and their sum.',
): { spec: PlotSpec; caption: string } | { note: string } {
  const path = join(dir, NOISE_TABLE);
  if (!listed || !existsSync(path)) {
    return { note: 'This run has no noise table: its noise is white only (flat spectrum), and the budget uses that white level. A run whose scenario describes 1/f, telegraph or component noise gets the spectrum of each component here.' };
  }
  const t = readArrowFile(path, '', ['component', 'frequency', 'psd']);
  const unit = t.schema.fields.find((f) => f.name === 'psd')?.metadata.get('unit') ?? '';
  const component = Array.from(t.getChild('component')!, String);
  const f = Array.from(t.getChild('frequency')!, Number);
  const psd = Array.from(t.getChild('psd')!, Number);
  const components = component.map((name, i) => ({ name, f: f[i]!, psd: psd[i]! }));
  return {
    spec: spectrumSpec({ yTitle: unit ? `one-sided PSD (${unit}, log scale)` : 'one-sided PSD (log scale)', components }),
    caption,
  };
}
