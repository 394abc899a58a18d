import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { defaultEsConfig, parseEsConfig, validateEsConfig } from '../../src/evolve/index.js';

describe('ES configuration', () => {
  it('has valid defaults', () => {
    expect(validateEsConfig(defaultEsConfig(), 'defaults')).toEqual([]);
  });

  it('names every bad field with its path', () => {
    const bad = { ...defaultEsConfig(), pairs: 2.5, sigma: 0, beta2: 1, weightDecay: -1, epsilon: NaN, lr: 1 };
    const problems = validateEsConfig(bad, 'recipe.json: es');
    expect(problems.map((p) => p.split(':').slice(0, 2).join(':')).sort()).toEqual([
      'recipe.json: es.beta2', 'recipe.json: es.epsilon', 'recipe.json: es.lr',
      'recipe.json: es.pairs', 'recipe.json: es.sigma', 'recipe.json: es.weightDecay',
    ]);
  });

  it('fills missing fields from the defaults and refuses bad ones with a UserError', () => {
    expect(parseEsConfig({ pairs: 4 }, 'es')).toEqual({ ...defaultEsConfig(), pairs: 4 });
    expect(() => parseEsConfig({ sigma: -0.1 }, 'es')).toThrow(UserError);
    expect(() => parseEsConfig([], 'es')).toThrow(/es: expected an object/);
  });
});
