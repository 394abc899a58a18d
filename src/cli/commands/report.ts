import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { Command } from 'commander';
import { fingerprint, makeContext } from '../../coevo/index.js';
import { UserError } from '../../core/index.js';
import { loadSafetensorsWalker } from '../../export/index.js';
import { defaultWorkerCount, makeEvaluator, sceneBatch } from '../../pool/index.js';
import { initialCourse, reportData, reportHtml, strobeSvg } from '../../report/index.js';
import { loadWalker, openRun, writeFileAtomic } from '../../store/index.js';
import { buildCourse } from '../../terrain/index.js';
import { intIn } from '../options.js';

interface ReportOptions { out?: string; workers: number; quiet?: boolean }

async function reportAction(dir: string, o: ReportOptions): Promise<void> {
  const { inputs, state } = openRun(dir);
  const out = o.out ?? join(inputs.dir, 'report', 'index.html');
  const evaluator = makeEvaluator(o.workers);
  try {
    if (!o.quiet) process.stderr.write(`replaying ${state.courses.length} courses...\n`);
    const data = await reportData(inputs, state, fingerprint(state, inputs.recipeHash), evaluator);
    mkdirSync(dirname(out), { recursive: true });
    writeFileAtomic(out, reportHtml({ ...data, initialCourse: initialCourse(data) }));
    process.stdout.write(`report of iteration ${state.iteration} written to ${out}\n`);
  } finally {
    await evaluator.close();
  }
}

interface RenderOptions { course: number; walker?: string; out: string; every: number }

async function renderAction(dir: string, o: RenderOptions): Promise<void> {
  const { inputs, state } = openRun(dir);
  const rec = state.courses.find((c) => c.id === o.course);
  if (!rec) throw new UserError(`Run ${dir} has no course ${o.course}; it has ${state.courses.map((c) => c.id).join(', ')}`);
  const ctx = makeContext(inputs.recipe, inputs.family, inputs.plan);
  let params: readonly number[] = (rec.solvedBy ?? rec.best).params;
  let shape = ctx.shape;
  if (o.walker) {
    const w = o.walker.endsWith('.safetensors') ? loadSafetensorsWalker(o.walker) : loadWalker(o.walker);
    params = Array.from(w.params);
    shape = w.shape;
  }
  const course = buildCourse(rec.genome, inputs.family);
  const batch = sceneBatch(course, inputs.plan, shape, { ...ctx.rollout, traceEvery: 5 }, params);
  const evaluator = makeEvaluator(0);
  try {
    const [r] = await evaluator.evaluate(batch);
    const svg = strobeSvg(course, inputs.plan.segments, r.trace?.frames ?? [], `course ${rec.id}: progress ${r.progress.toFixed(3)}`, o.every);
    writeFileAtomic(o.out, svg);
    process.stdout.write(`course ${rec.id}: progress ${r.progress.toFixed(3)}; picture written to ${o.out}\n`);
  } finally {
    await evaluator.close();
  }
}

export function registerReport(program: Command): void {
  program
    .command('report')
    .description('write one self-contained HTML page: curves, lineage tree, course map and replays')
    .argument('<run-dir>', 'run directory (its newest valid checkpoint; works while the run goes on)')
    .option('--out <file>', 'HTML file (default <run-dir>/report/index.html)')
    .option('--workers <n>', 'worker threads for the replays', intIn(0, 1024), defaultWorkerCount())
    .option('--quiet', 'no progress on stderr')
    .action(reportAction);
  program
    .command('render')
    .description("draw one course with a walker's motion as a strobe of poses (SVG)")
    .argument('<run-dir>', 'run directory')
    .requiredOption('--course <id>', 'course id', intIn(0, 2 ** 31 - 1))
    .option('--walker <file>', 'walker (cairn walker JSON or exported .safetensors); default: the course\'s solver or best walker')
    .requiredOption('--out <file>', 'SVG file to write')
    .option('--every <frames>', 'draw every n-th recorded pose (poses are recorded every 5 steps)', intIn(1, 10_000), 12)
    .action(renderAction);
}
