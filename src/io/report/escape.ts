/**
 * Escaping of user text for the report page. Every string that comes from a scenario or a
 * table (names, descriptions, keys, values) goes through one of these before it reaches HTML.
 */

const HTML: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text safe inside an element or a double- or single-quoted attribute value. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML[c]!);
}

/** An HTML fragment that is known to be safe (built by this module's users from escaped parts). */
export class SafeHtml {
  constructor(readonly html: string) {}
}

/** Marks a fragment as safe; use only on text built from escaped parts and fixed markup. */
export function trusted(html: string): SafeHtml {
  return new SafeHtml(html);
}

/**
 * Template tag that escapes every interpolated value unless it is SafeHtml (or an array of
 * them): html`<p>${name}</p>` is safe for any `name`.
 */
export function html(strings: TemplateStringsArray, ...values: unknown[]): SafeHtml {
  let out = strings[0]!;
  values.forEach((v, i) => {
    out += render(v) + strings[i + 1]!;
  });
  return new SafeHtml(out);
}

function render(v: unknown): string {
  if (v === null || v === undefined || v === false) return '';
  if (Array.isArray(v)) return v.map(render).join('');
  if (v instanceof SafeHtml) return v.html;
  return escapeHtml(String(v));
}
