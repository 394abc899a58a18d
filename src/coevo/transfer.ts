import type { Evaluator } from '../pool/index.js';
import { courseSolver, PhaseBatch, type TaskHandle } from './batch.js';
import { freshEs, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { finishEsStep, type PlannedEsStep } from './es-batch.js';
import type { PairState } from './state.js';

interface Offer {
  readonly from: PairState;
  readonly how: 'zero-shot' | 'fine-tuned';
  readonly params: readonly number[];
  progress: number;
}

interface Target {
  readonly pair: PairState;
  incumbent: number;
  readonly offers: Offer[];
}

/** Batch 1: each pair's incumbent and every other active walker, as they are, on the pair's course (under the course's solver). */
async function zeroShot(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<Target[]> {
  const b = new PhaseBatch(ctx, draft);
  const plan = draft.pairs.map((p) => {
    const c = b.course(p.courseId);
    const e = b.episode(courseSolver(draft.course(p.courseId)));
    return { p, inc: b.rollout(c, p.es.mean, e), others: draft.pairs.filter((q) => q !== p).map((q) => ({ q, t: b.rollout(c, q.es.mean, e) })) };
  });
  const r = await b.run(evaluator, draft);
  return plan.map(({ p, inc, others }) => ({
    pair: p,
    incumbent: r.progress(inc),
    offers: others.map(({ q, t }) => ({ from: q, how: 'zero-shot' as const, params: q.es.mean, progress: r.progress(t) })),
  }));
}

/** Batches 2 and 3: the best few zero-shot walkers of each course take one ES step there, then are evaluated. */
async function fineTune(ctx: RunContext, draft: Draft, evaluator: Evaluator, targets: Target[]): Promise<void> {
  const top = ctx.recipe.transfer.fineTuneTop;
  if (top === 0) return;
  const b = new PhaseBatch(ctx, draft);
  const steps: { target: Target; from: PairState; planned: PlannedEsStep }[] = [];
  for (const target of targets) {
    const ranked = [...target.offers].sort((x, y) => y.progress - x.progress).slice(0, top);
    for (const o of ranked) {
      const es = freshEs(ctx, o.params, `iteration/${draft.iteration}/transfer/${target.pair.courseId}/${o.from.walkerId}`);
      const id = target.pair.courseId;
      steps.push({ target, from: o.from, planned: b.esStep(es, b.course(id), b.episode(courseSolver(draft.course(id)))) });
    }
  }
  if (steps.length === 0) return;
  const r = await b.run(evaluator, draft);
  const b2 = new PhaseBatch(ctx, draft);
  const tuned = steps.map((s) => {
    const params = finishEsStep(s.planned, ctx.es, r.all).state.mean;
    const id = s.target.pair.courseId;
    const task: TaskHandle = b2.rollout(b2.course(id), params, b2.episode(courseSolver(draft.course(id))));
    return { ...s, params, task };
  });
  const r2 = await b2.run(evaluator, draft);
  for (const t of tuned) t.target.offers.push({ from: t.from, how: 'fine-tuned', params: t.params, progress: r2.progress(t.task) });
}

/**
 * Phase 3: for each pair, every other active walker is tried on its course zero-shot and (the
 * best few) after one ES step there; the best offer takes the course over when it beats the
 * incumbent's progress by more than the margin (ties: zero-shot before fine-tuned, then earlier pair). All
 * decisions use the walkers as they were at the start of the phase, so order does not matter.
 */
export async function transferPhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  if (draft.pairs.length < 2) return;
  const targets = await zeroShot(ctx, draft, evaluator);
  await fineTune(ctx, draft, evaluator, targets);
  const margin = ctx.recipe.transfer.margin;
  draft.pairs = targets.map(({ pair, incumbent, offers }) => {
    let best: Offer | null = null;
    for (const o of offers) if (!best || o.progress > best.progress) best = o;
    if (!best || best.progress <= incumbent + margin) return pair;
    const walkerId = draft.newWalkerId();
    const course = draft.course(pair.courseId);
    draft.setCourse({ ...course, holders: [...course.holders, { walkerId, since: draft.iteration, how: best.how }] });
    draft.noteBest(pair.courseId, best.progress, walkerId, best.params);
    draft.counters.takeovers++;
    draft.events.push({
      type: 'takeover', iteration: draft.iteration, courseId: pair.courseId, fromCourse: best.from.courseId, walkerId: best.from.walkerId,
      newWalkerId: walkerId, how: best.how, progress: best.progress, incumbentProgress: incumbent,
    });
    return { courseId: pair.courseId, walkerId, es: freshEs(ctx, best.params, `course/${pair.courseId}/walker/${walkerId}/es-noise`), progress: best.progress };
  });
}
