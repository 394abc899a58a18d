/**
 * Determinism as a tested promise: a short real run (physics included) gives the same states,
 * fingerprints and event logs whether its rollouts run in this thread or on one or two worker
 * threads, and a step depends on nothing but the state it is given.
 *
 * The recipe is tiny but reaches every phase within three iterations: admission at iteration 2
 * (admits two courses and retires the start course), solve checks, and a transfer round at
 * iteration 3. A wide ES noise (σ 0.5) makes the random walkers move, so results differ enough
 * for a mix-up to show. Worker threads run dist/, rebuilt first when stale.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { fingerprint, initialState, step, type RunState, type StepOutcome } from '../../src/coevo/index.js';
import { InlineEvaluator, ThreadEvaluator, type Evaluator } from '../../src/pool/index.js';
import { contextFor, ensureBuilt, tinyRecipe } from './helpers.js';

const ITERATIONS = 3;
const recipe = tinyRecipe({
  seed: 5,
  es: { population: 4, sigma: 0.5, learningRate: 0.2 },
  episode: { maxSteps: 150, trainingPush: 0.2 },
  population: { maxActive: 2 },
  admission: { interval: 2, reproduceAbove: 0, candidates: 3, low: 0, high: 1, admitPerRound: 2 },
  transfer: { interval: 3, fineTuneTop: 1 },
  solve: { threshold: 0.01, checks: 2 },
});
const RECIPE_HASH = 'test-recipe-hash';

interface Trace {
  readonly fingerprints: string[];
  readonly events: string[];
  readonly metrics: string[];
  readonly states: RunState[];
}

/** Runs the recipe from its initial state; each run gets its own context (the course cache is per run). */
async function run(evaluator: Evaluator): Promise<Trace> {
  const ctx = contextFor(recipe);
  let state = initialState(ctx);
  const t: Trace = { fingerprints: [], events: [], metrics: [], states: [state] };
  try {
    for (let i = 0; i < ITERATIONS; i++) {
      const out: StepOutcome = await step(state, ctx, evaluator);
      state = out.state;
      t.fingerprints.push(fingerprint(state, RECIPE_HASH));
      t.events.push(canonicalJson(out.events));
      t.metrics.push(canonicalJson(out.metrics));
      t.states.push(state);
    }
  } finally {
    await evaluator.close();
  }
  return t;
}

describe('fingerprint invariance', () => {
  let reference: Trace;

  beforeAll(async () => {
    ensureBuilt();
    reference = await run(new InlineEvaluator());
  }, 300_000);

  it('reaches admission, retirement and a transfer round', () => {
    const events = reference.events.flatMap((e) => JSON.parse(e) as { type: string; outcome?: string }[]);
    expect(events.some((e) => e.type === 'candidate' && e.outcome === 'admitted')).toBe(true);
    expect(events.some((e) => e.type === 'retired')).toBe(true);
    const [before, after] = [reference.states[ITERATIONS - 1], reference.states[ITERATIONS]];
    const pairs = before.pairs.length;
    expect(pairs).toBeGreaterThanOrEqual(2);
    // The ES phase alone runs pairs × (mean + es.population) rollouts; the transfer round adds at
    // least pairs × pairs zero-shot ones (incumbent and every other walker on each course).
    const esOnly = pairs * (1 + recipe.es.population);
    expect(after.counters.rollouts - before.counters.rollouts).toBeGreaterThanOrEqual(esOnly + pairs * pairs);
  });

  it.each([1, 2])('gives identical states and events on %i worker thread(s)', async (workers) => {
    const t = await run(new ThreadEvaluator(workers));
    expect(t.fingerprints).toEqual(reference.fingerprints);
    expect(t.events).toEqual(reference.events);
    expect(t.metrics).toEqual(reference.metrics);
  }, 180_000);

  it('continues identically from a serialised state with a fresh context', async () => {
    const saved = JSON.parse(canonicalJson(reference.states[ITERATIONS - 1])) as RunState;
    const out = await step(saved, contextFor(recipe), new InlineEvaluator());
    expect(fingerprint(out.state, RECIPE_HASH)).toBe(reference.fingerprints[ITERATIONS - 1]);
    expect(canonicalJson(out.events)).toBe(reference.events[ITERATIONS - 1]);
  }, 120_000);

  it('changes with the recipe hash and with any change of state', () => {
    const s = reference.states[ITERATIONS];
    expect(fingerprint(s, RECIPE_HASH)).toMatch(/^[0-9a-f]{64}$/);
    expect(fingerprint(s, 'another')).not.toBe(fingerprint(s, RECIPE_HASH));
    const nudged: RunState = { ...s, pairs: s.pairs.map((p, i) => (i === 0 ? { ...p, progress: p.progress + 1e-15 } : p)) };
    expect(fingerprint(nudged, RECIPE_HASH)).not.toBe(fingerprint(s, RECIPE_HASH));
    expect(new Set(reference.fingerprints).size).toBe(ITERATIONS);
  });
});
