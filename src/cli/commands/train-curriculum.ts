import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { actionSize, loadBodyPlan, observationSize } from '../../body/index.js';
import { plural, UserError } from '../../core/index.js';
import { trainCurriculum, trainDirect, type CurriculumTrainSettings, type PathReport } from '../../coevo/index.js';
import { defaultEsConfig } from '../../evolve/index.js';
import { bodyOf, courseOf, loadCurriculum } from '../../export/index.js';
import { rolloutOptionsOf } from '../../export/index.js';
import { makeEvaluator, threads } from '../../pool/index.js';
import type { PolicyShape } from '../../policy/index.js';
import { saveWalker, writeFileAtomic } from '../../store/index.js';
import { formatDuration, Progress } from '../progress.js';

export interface CurriculumTrainOptions {
  curriculum: string; body?: string; hidden: number[]; activation: 'tanh' | 'relu' | 'linear';
  population: number; sigma: number; learningRate: number; seed: number; workers: number; out?: string;
  stageIterations: number; advanceAt: number; compare?: boolean; quiet?: boolean; json?: boolean;
}

function describe(name: string, r: PathReport): string {
  const stages = r.stages.map((s) => `course ${s.courseId}: ${s.progress.toFixed(3)} in ${s.iterations} it${s.advanced ? '' : ' (budget ran out)'}`);
  return `${name}: final-course progress ${r.finalProgress.toFixed(3)}, ${plural(r.rollouts, 'rollout')}\n  ${stages.join('\n  ')}`;
}

/** `cairn train --curriculum`: a fresh walker through the exported courses in order, optionally against the direct path. */
export async function trainCurriculumAction(o: CurriculumTrainOptions): Promise<void> {
  const cur = loadCurriculum(o.curriculum);
  if (cur.courses.length === 0) throw new UserError(`Curriculum ${o.curriculum} has no courses`);
  const plan = o.body ? loadBodyPlan(o.body) : bodyOf(cur);
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: o.hidden, outputs: actionSize(plan), activation: o.activation };
  const settings: CurriculumTrainSettings = {
    advanceAt: o.advanceAt, stageIterations: o.stageIterations, seed: o.seed, rollout: rolloutOptionsOf(cur),
    es: { ...defaultEsConfig(), population: o.population, sigma: o.sigma, learningRate: o.learningRate },
  };
  const stages = cur.courses.map((e) => ({ id: e.id, course: courseOf(e) }));
  const out = o.out ?? join('runs', `curriculum-train-${plan.name}-s${o.seed}`);
  mkdirSync(out, { recursive: true });
  const progress = new Progress(o.quiet === true, 0);
  const t0 = performance.now();
  const evaluator = makeEvaluator(threads(o.workers));
  try {
    const curriculum = await trainCurriculum(stages, plan, shape, settings, evaluator, (s) =>
      progress.update(`curriculum: course ${s.courseId} progress ${s.progress.toFixed(3)} after ${plural(s.iterations, 'iteration')} (${formatDuration((performance.now() - t0) / 1000)})`, true));
    let direct: PathReport | null = null;
    if (o.compare) {
      progress.update(`direct path: ${plural(curriculum.rollouts, 'rollout')} on course ${stages[stages.length - 1].id}...`, true);
      direct = await trainDirect(stages[stages.length - 1], plan, shape, settings, curriculum.rollouts, evaluator);
    }
    progress.done();
    const meta = { curriculum: o.curriculum, seed: o.seed };
    saveWalker(join(out, 'walker.json'), { body: o.body ?? join(cur.dir, cur.body.file), bodyName: plan.name, shape, params: curriculum.params, meta: { ...meta, path: 'curriculum' } });
    if (direct) saveWalker(join(out, 'direct-walker.json'), { body: o.body ?? join(cur.dir, cur.body.file), bodyName: plan.name, shape, params: direct.params, meta: { ...meta, path: 'direct' } });
    const strip = (r: PathReport) => ({ stages: r.stages, finalProgress: r.finalProgress, rollouts: r.rollouts });
    const report = { curriculum: strip(curriculum), direct: direct ? strip(direct) : null, finalCourse: stages[stages.length - 1].id, seconds: (performance.now() - t0) / 1000 };
    writeFileAtomic(join(out, 'report.json'), `${JSON.stringify(report, null, 1)}\n`);
    if (o.json) process.stdout.write(`${JSON.stringify(report)}\n`);
    else process.stdout.write(`${describe('curriculum path', curriculum)}\n${direct ? `${describe('direct path', direct)}\n` : ''}written to ${out}\n`);
  } finally {
    await evaluator.close();
  }
}
