/** Reading a JSON file the tool wrote, with one-line errors naming the file. */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.ts';

/** Parses the JSON file at `path`; `missing` is the message when it cannot be read. */
export function readJsonFile(path: string, missing: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new InputError(path, '', missing);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new InputError(path, '', 'is not valid JSON');
  }
}
