/**
 * Scenario text to a plain document: YAML 1.2 (JSON is accepted as is).
 */
import { parseAllDocuments } from 'yaml';
import { InputError } from '../errors.ts';

/** Most YAML alias expansions allowed in one file (refuses "billion laughs" files quickly). */
export const MAX_ALIAS_COUNT = 100;

/** First line of a parser message, without the trailing code excerpt. */
function firstLine(message: string): string {
  return message.split('\n')[0]!.replace(/:\s*$/, '');
}

/**
 * Parses scenario text. JSON is tried first (it is also YAML, but JSON.parse is exact about
 * it); otherwise a single YAML document. An empty file, a syntax error or several documents
 * is an InputError for `file`.
 */
export function parseScenarioText(text: string, file: string): unknown {
  const body = text.replace(/^\uFEFF/, '');
  if (/^\s*[{[]/.test(body)) {
    try {
      return JSON.parse(body);
    } catch {
      // Not JSON after all: YAML flow style reads the same start; fall through.
    }
  }
  const docs = parseAllDocuments(body, { prettyErrors: true, uniqueKeys: true, strict: true, schema: 'core' });
  const list = Array.isArray(docs) ? docs : [];
  if (list.length > 1) {
    throw new InputError(file, '', 'a single YAML document', `${list.length} documents (separated by "---")`);
  }
  const doc = list[0];
  if (doc === undefined || doc.contents === null) {
    throw new InputError(file, '', 'a scenario (a YAML or JSON mapping)', 'an empty file');
  }
  const problem = doc.errors[0];
  if (problem) throw new InputError(file, '', 'YAML or JSON', `a syntax error: ${firstLine(problem.message)}`);
  try {
    return doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    const reason = e instanceof Error ? firstLine(e.message) : String(e);
    throw new InputError(file, '', `YAML with at most ${MAX_ALIAS_COUNT} alias expansions`, `a file that expands too far (${reason})`);
  }
}
