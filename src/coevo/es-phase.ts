import { stream } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { courseSolver, PhaseBatch } from './batch.js';
import type { RunContext } from './context.js';
import type { Draft } from './draft.js';
import { finishEsStep } from './es-batch.js';

/**
 * Phase 1: every active pair takes one ES step on its own course, all in one batch (under the
 * stricter solver once a confirmation on the course has been tried); candidates
 * run with the iteration's random push (recipe `episode.trainingPush`), the mean without. Each pair's
 * recorded progress becomes its mean's progress (before the update), and course bests follow.
 */
export async function esPhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const b = new PhaseBatch(ctx, draft);
  const maxPush = ctx.recipe.episode.trainingPush;
  const planned = draft.pairs.map((p) => {
    // One push per pair and iteration, shared by all its candidates (common random numbers), so
    // mirrored candidates are compared under the same disturbance while walkers learn to bear it.
    const push = maxPush > 0 ? stream(ctx.recipe.seed, `iteration/${draft.iteration}/course/${p.courseId}/push`).uniform(-maxPush, maxPush) : 0;
    const solver = courseSolver(draft.course(p.courseId));
    return b.esStep(p.es, b.course(p.courseId), b.episode(solver, push), b.episode(solver));
  });
  const results = await b.run(evaluator, draft);
  draft.pairs = draft.pairs.map((p, i) => {
    const out = finishEsStep(planned[i], ctx.es, results.all);
    draft.noteBest(p.courseId, out.meanResult.progress, p.walkerId, p.es.mean);
    draft.evaluated.set(p.courseId, p.es.mean);
    return { ...p, es: out.state, progress: out.meanResult.progress };
  });
}
