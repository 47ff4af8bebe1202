/** Reading a JSON file the tool wrote, with one-line errors naming the file. */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.ts';
import { duplicateJsonKey } from '../scenario/json-keys.ts';
import { fileSystemError } from './fs-errors.ts';

/** Parses JSON text of the file `path` names; a syntax error or a repeated key is an InputError. */
export function parseJsonText(text: string, path: string): unknown {
  let v: unknown;
  try {
    v = JSON.parse(text) as unknown;
  } catch {
    throw new InputError(path, '', 'is not valid JSON');
  }
  const twice = duplicateJsonKey(text);
  if (twice) throw new InputError(path, twice.path, 'each key once in an object', `"${twice.key.slice(0, 40)}" twice`);
  return v;
}

/** Parses the JSON file at `path`; `missing` is the message when it does not exist. */
export function readJsonFile(path: string, missing: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw new InputError(path, '', missing);
    throw fileSystemError(e, path, 'reading');
  }
  return parseJsonText(text, path);
}
