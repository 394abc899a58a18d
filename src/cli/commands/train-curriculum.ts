import { plural } from '../../core/index.js';
import type { PathReport } from '../../coevo/index.js';
import { threads } from '../../pool/index.js';
import { trainThroughCurriculum } from '../../run/index.js';
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
  const progress = new Progress(o.quiet === true, 0);
  const r = await trainThroughCurriculum({ ...o, backend: threads(o.workers) }, {
    onStage: (s, seconds) => progress.update(`curriculum: course ${s.courseId} progress ${s.progress.toFixed(3)} after ${plural(s.iterations, 'iteration')} (${formatDuration(seconds)})`, true),
    onDirect: (rollouts, courseId) => progress.update(`direct path: ${plural(rollouts, 'rollout')} on course ${courseId}...`, true),
    onTrained: () => progress.done(),
  });
  if (o.json) process.stdout.write(`${JSON.stringify(r.report)}\n`);
  else process.stdout.write(`${describe('curriculum path', r.curriculum)}\n${r.direct ? `${describe('direct path', r.direct)}\n` : ''}written to ${r.out}\n`);
}
