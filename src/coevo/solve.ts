import { stream, type Stream } from '../core/index.js';
import type { BodyPlan } from '../body/index.js';
import { sceneBatch, type Evaluator, type MutableBatch } from '../pool/index.js';
import type { PolicyShape } from '../policy/index.js';
import type { RolloutOptions } from '../sim/index.js';
import type { Course } from '../terrain/index.js';
import { PhaseBatch } from './batch.js';
import type { RunContext } from './context.js';
import type { Draft } from './draft.js';
import type { PairState } from './state.js';

/** Settings of a solve confirmation (recipe `solve`): the threshold, the number of rollouts, the largest push in N·s. */
export interface ConfirmRule {
  readonly threshold: number;
  readonly checks: number;
  readonly push: number;
}

/** Horizontal pushes of a confirmation's `checks` rollouts: the first unpushed, each other one drawn from `s` in [−push, push] N·s. */
export function confirmationPushes(rule: ConfirmRule, s: Stream): number[] {
  return Array.from({ length: rule.checks }, (_, i) => (i === 0 ? 0 : s.uniform(-rule.push, rule.push)));
}

/** A confirmation holds when every one of its rollouts reached the threshold. */
export function confirmationHolds(rule: ConfirmRule, progress: readonly number[]): boolean {
  return progress.every((x) => x >= rule.threshold);
}

/** Adds a confirmation's rollouts of `params` to a one-scene batch (course, plan and shape 0): one per push, under `strict`, pushed unless the push is 0. */
export function addConfirmationTasks(batch: MutableBatch, strict: RolloutOptions, params: readonly number[], pushes: readonly number[]): void {
  for (const push of pushes) {
    const options = batch.options.push(push === 0 ? strict : { ...strict, push }) - 1;
    batch.tasks.push({ kind: 'rollout', course: 0, plan: 0, shape: 0, options, policy: { kind: 'params', params } });
  }
}

/**
 * Confirms one walker on one course outside a run, by the rule the run's solve phase applies:
 * `rule.checks` rollouts of `params` under `strict` (the stricter solver), pushed as
 * {@link confirmationPushes} draws them from `s`, all reaching the threshold.
 */
export async function confirmWalker(
  course: Course, plan: BodyPlan, shape: PolicyShape, strict: RolloutOptions, params: readonly number[], rule: ConfirmRule, s: Stream, evaluator: Evaluator,
): Promise<{ readonly ok: boolean; readonly checks: readonly number[] }> {
  const batch = sceneBatch(course, plan, shape, strict);
  addConfirmationTasks(batch, strict, params, confirmationPushes(rule, s));
  const checks = batch.tasks.length === 0 ? [] : (await evaluator.evaluate(batch)).map((r) => r.progress);
  return { ok: confirmationHolds(rule, checks), checks };
}

/** Whether a course was crossed (or solved, which implies a crossing) at some point. */
export function crossedOrSolved(c: { readonly crossedAt: number | null; readonly solvedAt: number | null }): boolean {
  return c.crossedAt !== null || c.solvedAt !== null;
}

/** Whether pair `p` is due a confirmation this iteration: at the threshold, not solved, and its last try (if any) `retryEvery` or more iterations ago. */
export function confirmationDue(ctx: RunContext, draft: Draft, p: PairState): boolean {
  const { threshold, retryEvery } = ctx.recipe.solve;
  const c = draft.course(p.courseId);
  return p.progress >= threshold && c.solvedAt === null && (c.lastConfirmAt === null || draft.iteration - c.lastConfirmAt >= retryEvery);
}

/**
 * Marks courses solved. A pair whose walker is at the solve threshold this iteration is
 * confirmed with `checks` more rollouts under a stricter solver (twice the iterations), the
 * first unpushed and the rest with a random horizontal push on the torso; every one must reach
 * the threshold. Walkers that only pass under the run's own solver are exploiting it. A failed
 * confirmation is tried again every `retryEvery` iterations while the pair stays at the
 * threshold; meanwhile the pair keeps training (walkers grow robust after first success).
 */
export async function solvePhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const rule = ctx.recipe.solve;
  const due = draft.pairs.filter((p) => confirmationDue(ctx, draft, p));
  if (due.length === 0) return;
  const b = new PhaseBatch(ctx, draft);
  const plans = due.map((p) => {
    const params = draft.evaluated.get(p.courseId) ?? p.es.mean;
    const best = { progress: p.progress, walkerId: p.walkerId, iteration: draft.iteration, params: [...params] };
    const s = stream(ctx.recipe.seed, `iteration/${draft.iteration}/solve/${p.courseId}`);
    const tasks = confirmationPushes(rule, s).map((push) => b.rollout(b.course(p.courseId), best.params, b.episode('strict', push)));
    return { pair: p, best, tasks };
  });
  const results = await b.run(evaluator, draft);
  for (const { pair, best, tasks } of plans) {
    const progress = tasks.map((t) => results.progress(t));
    const ok = confirmationHolds(rule, progress);
    const base = { iteration: draft.iteration, courseId: pair.courseId, walkerId: best.walkerId, progress: best.progress, checks: progress };
    draft.events.push({ type: ok ? 'solved' : 'unconfirmed', ...base });
    const c = draft.course(pair.courseId);
    draft.setCourse({ ...c, confirmTries: c.confirmTries + 1, lastConfirmAt: draft.iteration, ...(ok ? { solvedAt: draft.iteration, solvedBy: best } : {}) });
  }
}

/**
 * Records first crossings: a course whose best progress under the run's own solver (from any
 * phase) reached the solve threshold gets `crossedAt` and a 'crossed' event.
 */
export function markCrossings(ctx: RunContext, draft: Draft): void {
  const { threshold } = ctx.recipe.solve;
  for (const c of [...draft.courses]) {
    if (c.crossedAt !== null || c.best.progress < threshold) continue;
    draft.setCourse({ ...c, crossedAt: draft.iteration });
    draft.events.push({ type: 'crossed', iteration: draft.iteration, courseId: c.id, walkerId: c.best.walkerId, progress: c.best.progress });
  }
}
