import { readFileSync } from 'node:fs';
import { UserError } from './errors.js';

/** Reads and parses a JSON file, turning a missing file or bad syntax into a UserError naming the file. */
export function readJsonFile(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UserError(`${what} file not found or unreadable: ${path}${code ? ` (${code})` : ''}`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw new UserError(`${what} file is not valid JSON: ${path}: ${(e as Error).message}`);
  }
}
