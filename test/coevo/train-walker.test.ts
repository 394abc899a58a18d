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

  it('with candidatePush 0 trains exactly as without it; a push changes the candidates but never the mean\'s own rollout', async () => {
    const { course, plan, shape } = setup();
    const base = { iterations: 3, es: { ...defaultEsConfig(), population: 8 }, rollout: { ...defaultRolloutOptions(), maxSteps: 300 }, seed: 7 };
    const plain = await trainWalker(course, plan, shape, freshEsState(shape, 7), base, new InlineEvaluator());
    const zero = await trainWalker(course, plan, shape, freshEsState(shape, 7), { ...base, candidatePush: 0 }, new InlineEvaluator());
    const pushed = await trainWalker(course, plan, shape, freshEsState(shape, 7), { ...base, candidatePush: 0.3 }, new InlineEvaluator());
    expect(zero.log).toEqual(plain.log);
    expect(zero.state.mean).toEqual(plain.state.mean);
    // Iteration 1 evaluates the same starting mean unpushed; its candidates ran pushed, so the update differs.
    expect(pushed.log[0].progress).toBe(plain.log[0].progress);
    expect(pushed.log[0].bestCandidateProgress).not.toBe(plain.log[0].bestCandidateProgress);
    expect(pushed.state.mean).not.toEqual(plain.state.mean);
    expect(pushed.rollouts).toBe(plain.rollouts);
  });

  it('returns the best mean of the whole training with the weights that reached it', async () => {
    const { course, plan, shape } = setup();
    const settings = { iterations: 4, es: { ...defaultEsConfig(), population: 8 }, rollout: { ...defaultRolloutOptions(), maxSteps: 300 }, seed: 3, candidatePush: 0.2 };
    const out = await trainWalker(course, plan, shape, freshEsState(shape, 3), settings, new InlineEvaluator());
    const figures = [...out.log.map((l) => l.progress), out.finalProgress];
    expect(out.best.progress).toBe(Math.max(...figures));
    expect(out.best.updates).toBe(figures.indexOf(out.best.progress));
    // Evaluated again on its own, unpushed, the best weights give the same progress.
    const again = await trainWalker(course, plan, shape, freshEsState(shape, 3, out.best.params), { ...settings, iterations: 0 }, new InlineEvaluator());
    expect(again.finalProgress).toBe(out.best.progress);
  });
});
