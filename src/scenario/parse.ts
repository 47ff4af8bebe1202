/**
 * Scenario text to a plain document: YAML 1.2 (JSON is accepted as is).
 */
import { parseAllDocuments } from 'yaml';
import { InputError } from '../errors.ts';
import { duplicateJsonKey } from './json-keys.ts';

/** Most YAML alias expansions allowed in one file (refuses "billion laughs" files quickly). */
export const MAX_ALIAS_COUNT = 100;

/** Deepest nesting of mappings and lists a scenario may have (real ones use about 5 levels). */
export const MAX_NESTING = 64;

/** First line of a parser message, without the trailing code excerpt. */
function firstLine(message: string): string {
  return message.split('\n')[0]!.replace(/:\s*$/, '');
}

const tooDeep = (file: string, found: string) => new InputError(file, '', `a document nested at most ${MAX_NESTING} levels deep`, found);

/**
 * Deepest bracket nesting of flow-style YAML or JSON text, skipping quoted strings and
 * comments. A cheap scan run before the parser, whose recursion (and running time) grows with
 * the nesting; plain scalars holding brackets may over-count, which only matters past the limit.
 */
export function bracketDepth(text: string): number {
  let depth = 0, max = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '"' || c === "'") {
      // a quote starts a string only where a YAML/JSON value can start
      const before = i === 0 ? '\n' : text[i - 1]!;
      if (!/[\s[{,:]/.test(before)) continue;
      for (i++; i < text.length && text[i] !== c; i++) if (c === '"' && text[i] === '\\') i++;
    } else if (c === '#' && (i === 0 || /\s/.test(text[i - 1]!))) {
      while (i < text.length && text[i] !== '\n') i++;
    } else if (c === '[' || c === '{') {
      if (++depth > max) max = depth;
    } else if ((c === ']' || c === '}') && depth > 0) {
      depth--;
    }
  }
  return max;
}

/**
 * Nesting depth of a parsed document (a scalar is 0), computed without recursion; -1 when the
 * document contains itself (a YAML alias inside its own anchor makes a cycle). Shared nodes
 * (aliases) are measured once. Stops early, returning a value above `limit`, once it is exceeded.
 */
export function documentDepth(doc: unknown, limit = Infinity): number {
  const isNode = (v: unknown): v is object => v !== null && typeof v === 'object';
  if (!isNode(doc)) return 0;
  const height = new Map<object, number>();
  const onPath = new Set<object>();
  const stack: { node: object; children: unknown[]; next: number; best: number }[] = [];
  const enter = (node: object) => {
    onPath.add(node);
    stack.push({ node, children: Object.values(node), next: 0, best: 0 });
  };
  enter(doc);
  for (;;) {
    if (stack.length > limit) return stack.length;
    const top = stack[stack.length - 1]!;
    if (top.next < top.children.length) {
      const child = top.children[top.next++];
      if (!isNode(child)) continue;
      if (onPath.has(child)) return -1;
      const known = height.get(child);
      if (known !== undefined) top.best = Math.max(top.best, known);
      else enter(child);
      continue;
    }
    stack.pop();
    onPath.delete(top.node);
    const h = top.best + 1;
    height.set(top.node, h);
    if (stack.length === 0) return h;
    const parent = stack[stack.length - 1]!;
    parent.best = Math.max(parent.best, h);
  }
}

/** Parses, turning a parser stack overflow (deep nesting) into an InputError. */
function guardDepth<T>(file: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof RangeError) throw tooDeep(file, 'a document nested too deep for the parser');
    throw e;
  }
}

/**
 * Parses scenario text. JSON is tried first (it is also YAML, but JSON.parse is exact about
 * it); otherwise a single YAML document. An empty file, a syntax error or several documents
 * is an InputError for `file`.
 */
export function parseScenarioText(text: string, file: string): unknown {
  const body = text.replace(/^\uFEFF/, '');
  const brackets = bracketDepth(body);
  if (brackets > MAX_NESTING) throw tooDeep(file, `brackets nested ${brackets} deep`);
  const doc = guardDepth(file, () => parseBody(body, file));
  const depth = documentDepth(doc, MAX_NESTING);
  if (depth < 0) throw new InputError(file, '', 'a document that does not contain itself', 'an alias inside its own anchor');
  if (depth > MAX_NESTING) throw tooDeep(file, `more than ${MAX_NESTING} levels`);
  return doc;
}

function parseBody(body: string, file: string): unknown {
  if (/^\s*[{[]/.test(body)) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(body);
    } catch (e) {
      if (e instanceof RangeError) throw e;
      // Not JSON after all: YAML flow style reads the same start; fall through.
      parsed = undefined;
    }
    if (parsed !== undefined) {
      // JSON.parse keeps the last of two equal keys; YAML refuses them, and so does this tool
      const twice = duplicateJsonKey(body);
      if (twice) throw new InputError(file, twice.path, 'each key once in a mapping', `"${twice.key.slice(0, 40)}" twice`);
      return parsed;
    }
  }
  const docs = parseAllDocuments(body, { prettyErrors: true, uniqueKeys: true, strict: true, schema: 'core', logLevel: 'error' });
  const list = Array.isArray(docs) ? docs : [];
  if (list.length > 1) {
    throw new InputError(file, '', 'a single YAML document', `${list.length} documents (separated by "---")`);
  }
  const doc = list[0];
  if (doc === undefined || doc.contents === null) {
    throw new InputError(file, '', 'a scenario (a YAML or JSON mapping)', 'an empty file');
  }
  const problem = doc.errors[0];
  if (problem && /call stack/i.test(problem.message)) throw tooDeep(file, 'a document nested too deep for the parser');
  if (problem) throw new InputError(file, '', 'YAML or JSON', `a syntax error: ${firstLine(problem.message)}`);
  try {
    return doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    if (e instanceof RangeError) throw e;
    const reason = e instanceof Error ? firstLine(e.message) : String(e);
    throw new InputError(file, '', `YAML with at most ${MAX_ALIAS_COUNT} alias expansions`, `a file that expands too far (${reason})`);
  }
}
