import { stream } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { PhaseBatch } from './batch.js';
import type { RunContext } from './context.js';
import type { Draft } from './draft.js';

/**
 * Marks courses solved. A pair whose walker reached the solve threshold this iteration is
 * confirmed with `checks` more rollouts under a stricter solver (twice the iterations), the
 * first unpushed and the rest with a random horizontal push on the torso; every one must reach
 * the threshold. Walkers that only pass under the run's own solver are exploiting it.
 */
export async function solvePhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const { threshold, checks, push } = ctx.recipe.solve;
  const due = draft.pairs.filter((p) => p.progress >= threshold && draft.course(p.courseId).solvedAt === null);
  if (due.length === 0) return;
  const b = new PhaseBatch(ctx, draft);
  const plans = due.map((p) => {
    const params = draft.evaluated.get(p.courseId) ?? p.es.mean;
    const best = { progress: p.progress, walkerId: p.walkerId, iteration: draft.iteration, params: [...params] };
    const s = stream(ctx.recipe.seed, `iteration/${draft.iteration}/solve/${p.courseId}`);
    const tasks = Array.from({ length: checks }, (_, i) => b.rollout(b.course(p.courseId), best.params, b.episode('strict', i === 0 ? 0 : s.uniform(-push, push))));
    return { pair: p, best, tasks };
  });
  const results = await b.run(evaluator, draft);
  for (const { pair, best, tasks } of plans) {
    const progress = tasks.map((t) => results.progress(t));
    const ok = progress.every((x) => x >= threshold);
    const base = { iteration: draft.iteration, courseId: pair.courseId, walkerId: best.walkerId, progress: best.progress, checks: progress };
    draft.events.push({ type: ok ? 'solved' : 'unconfirmed', ...base });
    if (ok) draft.setCourse({ ...draft.course(pair.courseId), solvedAt: draft.iteration, solvedBy: best });
  }
}
