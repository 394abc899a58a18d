import type { Evaluator } from '../pool/index.js';
import { BatchBuilder, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { finishEsStep, planEsStep, type PlannedEsStep } from './es-batch.js';

/**
 * Phase 1: every active pair takes one ES step on its own course, all in one batch. Each pair's
 * recorded progress becomes its mean's progress (before the update), and course bests follow.
 */
export async function esPhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const b = new BatchBuilder(ctx, draft);
  const planned: PlannedEsStep[] = draft.pairs.map((p) =>
    planEsStep(p.es, ctx.es, { course: b.course(p.courseId), plan: 0, shape: 0, options: 0, base: b.base(p.es.mean) }, b.tasks),
  );
  const results = await evaluator.evaluate(b.batch());
  draft.count(results);
  draft.pairs = draft.pairs.map((p, i) => {
    const out = finishEsStep(planned[i], ctx.es, results);
    draft.noteBest(p.courseId, out.meanResult.progress, p.walkerId, p.es.mean);
    draft.evaluated.set(p.courseId, p.es.mean);
    return { ...p, es: out.state, progress: out.meanResult.progress };
  });
}
