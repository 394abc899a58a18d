import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { defaultEsConfig, mirroredCount, parseEsConfig, validateEsConfig } from '../../src/evolve/index.js';

describe('ES configuration', () => {
  it('has valid defaults', () => {
    expect(validateEsConfig(defaultEsConfig(), 'defaults')).toEqual([]);
  });

  it('names every bad field with its path', () => {
    const bad = { ...defaultEsConfig(), population: 7, sigma: 0, beta2: 1, weightDecay: -1, epsilon: NaN, lr: 1 };
    const problems = validateEsConfig(bad, 'recipe.json: es');
    expect(problems.map((p) => p.split(':').slice(0, 2).join(':')).sort()).toEqual([
      'recipe.json: es.beta2', 'recipe.json: es.epsilon', 'recipe.json: es.lr',
      'recipe.json: es.population', 'recipe.json: es.sigma', 'recipe.json: es.weightDecay',
    ]);
  });

  it('takes an even population of at least 2 and refuses an odd one or 0, saying why', () => {
    expect(validateEsConfig({ ...defaultEsConfig(), population: 2 }, 'es')).toEqual([]);
    for (const population of [0, 1, 33]) {
      expect(validateEsConfig({ ...defaultEsConfig(), population }, 'es')).toEqual([`es.population: expected an even integer ≥ 2 (candidates come in mirrored pairs), found ${population}`]);
    }
    expect(mirroredCount({ ...defaultEsConfig(), population: 32 })).toBe(16);
  });

  it('fills missing fields from the defaults and refuses bad ones with a UserError', () => {
    expect(parseEsConfig({ population: 4 }, 'es')).toEqual({ ...defaultEsConfig(), population: 4 });
    expect(() => parseEsConfig({ sigma: -0.1 }, 'es')).toThrow(UserError);
    expect(() => parseEsConfig([], 'es')).toThrow(/es: expected an object/);
  });
});
