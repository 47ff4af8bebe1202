/**
 * A hole in the dependency rules, closed: dependency-cruiser reads the sources with swc and
 * does not see a type written inline as `import('…').Name` (in a type alias, a generic
 * argument, …). Such an import would cross the layers unchecked, so the house forbids the
 * form in src/: a type from another file comes in through an `import type` statement, which
 * the dependency rules do see. Files are parsed with swc (a dev dependency), so a dynamic
 * `await import('…')` of code is told apart from a type.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { parseSync } from '@swc/core';

/** Every `import('…')` type in the .ts files under `root/src`, one line each. */
export function findInlineImportTypes(root: string): string[] {
  const found: string[] = [];
  for (const path of tsFiles(join(root, 'src'))) {
    const text = readFileSync(path, 'utf8');
    if (!text.includes('import(')) continue;
    const module = parseSync(text, { syntax: 'typescript', target: 'es2022', comments: false });
    const file = relative(root, path).split(sep).join('/');
    for (const specifier of importTypeSpecifiers(module)) {
      found.push(`${file}:${lineOf(text, specifier)}: import('${specifier}') used as a type; ` +
        'write `import type` so that the dependency rules see it');
    }
  }
  return found;
}

function tsFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...tsFiles(path));
    else if (entry.isFile() && entry.name.endsWith('.ts')) out.push(path);
  }
  return out.sort();
}

/** The specifiers of the TsImportType nodes of an swc syntax tree. */
function importTypeSpecifiers(node: unknown, out: string[] = []): string[] {
  if (Array.isArray(node)) {
    for (const child of node) importTypeSpecifiers(child, out);
  } else if (node !== null && typeof node === 'object') {
    const record = node as Record<string, unknown>;
    if (record['type'] === 'TsImportType') {
      const argument = record['argument'] as { value?: unknown } | undefined;
      if (typeof argument?.value === 'string') out.push(argument.value);
    }
    for (const key in record) if (key !== 'span') importTypeSpecifiers(record[key], out);
  }
  return out;
}

/** The first line (1-based) that holds both `import(` and the specifier; 0 if none does. */
function lineOf(text: string, specifier: string): number {
  return text.split('\n').findIndex((line) => line.includes('import(') && line.includes(specifier)) + 1;
}
