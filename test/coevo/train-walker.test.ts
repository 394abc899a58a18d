import { describe, expect, it } from 'vitest';
import { actionSize, loadBodyPlan, observationSize } from '../../src/body/index.js';
import { freshEsState, trainWalker } from '../../src/coevo/index.js';
import { defaultEsConfig } from '../../src/evolve/index.js';
import { InlineEvaluator } from '../../src/pool/index.js';
import type { PolicyShape } from '../../src/policy/index.js';
import { defaultRolloutOptions } from '../../src/sim/index.js';
import { buildCourse, loadFamily } from '../../src/terrain/index.js';

function setup() {
  const family = loadFamily('envs/terrain/starter.json');
  const course = buildCourse(family.start, family);
  const plan = loadBodyPlan('envs/bodies/trestle.json');
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: [], outputs: actionSize(plan), activation: 'tanh' };
  return { course, plan, shape };
}

describe('trainWalker', () => {
  it('raises progress on a short flat course above the untrained walker within a few ES iterations', async () => {
    const { course, plan, shape } = setup();
    const settings = {
      iterations: 8, es: { ...defaultEsConfig(), population: 16 },
      rollout: { ...defaultRolloutOptions(), maxSteps: 400 }, seed: 5,
    };
    const out = await trainWalker(course, plan, shape, freshEsState(shape, 5), settings, new InlineEvaluator());
    const untrained = out.log[0].progress;
    expect(out.log).toHaveLength(8);
    expect(out.rollouts).toBe(8 * 17 + 1);
    // The seeded, untrained walker barely moves; a handful of updates must make it walk.
    expect(out.finalProgress).toBeGreaterThan(untrained + 0.05);
  });

  it('stops early once the mean walker reaches stopAtProgress and returns those weights', async () => {
    const { course, plan, shape } = setup();
    const settings = { iterations: 30, stopAtProgress: 0.01, es: { ...defaultEsConfig(), population: 8 }, rollout: { ...defaultRolloutOptions(), maxSteps: 300 }, seed: 5 };
    const out = await trainWalker(course, plan, shape, freshEsState(shape, 5), settings, new InlineEvaluator());
    const last = out.log[out.log.length - 1];
    expect(out.log.length).toBeLessThan(30);
    expect(last.progress).toBeGreaterThanOrEqual(0.01);
    // The returned weights are the ones that reached the target: evaluating them again gives the same progress.
    expect(out.finalProgress).toBe(last.progress);
  });
});
