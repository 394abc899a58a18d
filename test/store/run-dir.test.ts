/**
 * Creating a run directory: what is on disk before the first iteration.
 */
import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createRunDir } from '../../src/store/index.js';
import { tempDir, writeTinyRecipe } from './helpers.js';

const root = tempDir('rundir');
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('createRunDir', () => {
  it('creates metrics.jsonl, events.jsonl and faults.jsonl empty before the first iteration', () => {
    const inputs = createRunDir(writeTinyRecipe(root), join(root, 'run'), {});
    expect(readdirSync(inputs.dir).sort()).toEqual(['body.json', 'checkpoints', 'events.jsonl', 'family.json', 'faults.jsonl', 'metrics.jsonl', 'recipe.json', 'sessions.jsonl']);
    for (const log of ['metrics.jsonl', 'events.jsonl', 'faults.jsonl', 'sessions.jsonl']) expect(readFileSync(join(inputs.dir, log), 'utf8')).toBe('');
  });
});
