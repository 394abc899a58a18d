import { stream } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { BatchBuilder, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { finishEsStep, planEsStep, type PlannedEsStep } from './es-batch.js';

/**
 * Phase 1: every active pair takes one ES step on its own course, all in one batch; candidates
 * run with the iteration's random push (recipe `episode.trainingPush`), the mean without. Each pair's
 * recorded progress becomes its mean's progress (before the update), and course bests follow.
 */
export async function esPhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const b = new BatchBuilder(ctx, draft);
  const maxPush = ctx.recipe.episode.trainingPush;
  const planned: PlannedEsStep[] = draft.pairs.map((p) => {
    // One push per pair and iteration, shared by all its candidates (common random numbers), so
    // mirrored candidates are compared under the same disturbance while walkers learn to bear it.
    const push = maxPush > 0 ? stream(ctx.recipe.seed, `iteration/${draft.iteration}/course/${p.courseId}/push`).uniform(-maxPush, maxPush) : 0;
    const options = push === 0 ? 0 : b.pushOption(0, push);
    return planEsStep(p.es, ctx.es, { course: b.course(p.courseId), plan: 0, shape: 0, options, meanOptions: 0, base: b.base(p.es.mean) }, b.tasks);
  });
  const results = await evaluator.evaluate(b.batch());
  draft.count(results);
  draft.pairs = draft.pairs.map((p, i) => {
    const out = finishEsStep(planned[i], ctx.es, results);
    draft.noteBest(p.courseId, out.meanResult.progress, p.walkerId, p.es.mean);
    draft.evaluated.set(p.courseId, p.es.mean);
    return { ...p, es: out.state, progress: out.meanResult.progress };
  });
}
