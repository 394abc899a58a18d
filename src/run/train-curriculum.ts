import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { loadBodyPlan } from '../body/index.js';
import { UserError } from '../core/index.js';
import { trainCurriculum, trainDirect, type CurriculumTrainSettings, type PathReport, type StageReport } from '../coevo/index.js';
import { bodyOf, courseOf, loadCurriculum, rolloutOptionsOf } from '../export/index.js';
import { saveWalker, writeFileAtomic } from '../store/index.js';
import { freshShape, withEvaluator } from './scene.js';
import { esOf, type TrainFigures } from './train.js';

/** `cairn train --curriculum`. */
export interface CurriculumPathOptions extends TrainFigures {
  /** The exported curriculum.json. */
  readonly curriculum: string;
  /** Body plan file; absent = the exported one. */
  readonly body?: string;
  /** Most ES iterations per course. */
  readonly stageIterations: number;
  /** Move on once progress reaches this. */
  readonly advanceAt: number;
  /** Also train the direct path on the final course with the same rollout budget. */
  readonly compare?: boolean;
}

/** Called as training goes; `seconds` is wall time since training started. */
export interface CurriculumPathHooks {
  readonly onStage?: (stage: StageReport, seconds: number) => void;
  /** The direct path starts: its rollout budget and the course it trains on. */
  readonly onDirect?: (rollouts: number, courseId: number) => void;
  /** Training is over; the files are written next. */
  readonly onTrained?: () => void;
}

/** A path's report without its weights. */
export interface PathSummary {
  readonly stages: readonly StageReport[];
  readonly finalProgress: number;
  readonly rollouts: number;
}

/** What `report.json` holds. */
export interface CurriculumPathReport {
  readonly curriculum: PathSummary;
  readonly direct: PathSummary | null;
  readonly finalCourse: number;
  /** Wall time (s). */
  readonly seconds: number;
}

export interface CurriculumPathResult {
  readonly out: string;
  readonly curriculum: PathReport;
  readonly direct: PathReport | null;
  readonly report: CurriculumPathReport;
}

/**
 * A fresh walker trained through the exported courses in order, optionally against the direct
 * path on the final course; writes `walker.json` (and `direct-walker.json`) and `report.json`.
 */
export async function trainThroughCurriculum(o: CurriculumPathOptions, hooks: CurriculumPathHooks = {}): Promise<CurriculumPathResult> {
  const cur = loadCurriculum(o.curriculum);
  if (cur.courses.length === 0) throw new UserError(`Curriculum ${o.curriculum} has no courses`);
  const plan = o.body ? loadBodyPlan(o.body) : bodyOf(cur);
  const shape = freshShape(plan, o.hidden, o.activation);
  const settings: CurriculumTrainSettings = { advanceAt: o.advanceAt, stageIterations: o.stageIterations, seed: o.seed, rollout: rolloutOptionsOf(cur), es: esOf(o) };
  const stages = cur.courses.map((e) => ({ id: e.id, course: courseOf(e) }));
  const final = stages[stages.length - 1];
  const out = o.out ?? join('runs', `curriculum-train-${plan.name}-s${o.seed}`);
  mkdirSync(out, { recursive: true });
  const t0 = performance.now();
  return withEvaluator(o.backend, async (evaluator) => {
    const curriculum = await trainCurriculum(stages, plan, shape, settings, evaluator, (s) => hooks.onStage?.(s, (performance.now() - t0) / 1000));
    let direct: PathReport | null = null;
    if (o.compare) {
      hooks.onDirect?.(curriculum.rollouts, final.id);
      direct = await trainDirect(final, plan, shape, settings, curriculum.rollouts, evaluator);
    }
    hooks.onTrained?.();
    const meta = { curriculum: o.curriculum, seed: o.seed };
    const body = o.body ?? join(cur.dir, cur.body.file);
    saveWalker(join(out, 'walker.json'), { body, bodyName: plan.name, shape, params: curriculum.params, meta: { ...meta, path: 'curriculum' } });
    if (direct) saveWalker(join(out, 'direct-walker.json'), { body, bodyName: plan.name, shape, params: direct.params, meta: { ...meta, path: 'direct' } });
    const strip = (r: PathReport): PathSummary => ({ stages: r.stages, finalProgress: r.finalProgress, rollouts: r.rollouts });
    const report = { curriculum: strip(curriculum), direct: direct ? strip(direct) : null, finalCourse: final.id, seconds: (performance.now() - t0) / 1000 };
    writeFileAtomic(join(out, 'report.json'), `${JSON.stringify(report, null, 1)}\n`);
    return { out, curriculum, direct, report };
  });
}
