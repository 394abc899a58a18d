import type { Command } from 'commander';
import { plural } from '../../core/index.js';
import { Run, writeComparison, writeReport, writeStrobe } from '../../run/index.js';
import { backendOf, workersOption } from '../backend.js';
import { intIn } from '../options.js';

interface ReportOptions { out?: string; workers: number; quiet?: boolean }

async function reportAction(dirs: string[], o: ReportOptions): Promise<void> {
  if (dirs.length > 1) {
    const out = writeComparison(dirs.map((d) => Run.open(d)), o.out);
    process.stdout.write(`comparison of ${dirs.length} runs written to ${out}\n`);
    return;
  }
  const run = Run.open(dirs[0]);
  const { state } = run.latest();
  if (!o.quiet) process.stderr.write(`replaying ${plural(state.courses.length, 'course')}...\n`);
  const { file, warnings } = await writeReport(run, state, o.out, backendOf(o));
  for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
  process.stdout.write(`report of iteration ${state.iteration} written to ${file}\n`);
}

interface RenderOptions { course: number; walker?: string; out: string; every: number }

async function renderAction(dir: string, o: RenderOptions): Promise<void> {
  const run = Run.open(dir);
  const { state } = run.latest();
  const r = await writeStrobe(run, state, o.course, o.walker, o.every, o.out);
  process.stdout.write(`course ${o.course}: progress ${r.progress.toFixed(3)}; picture written to ${o.out}\n`);
}

export function registerReport(program: Command): void {
  const report = program
    .command('report')
    .description('write one self-contained HTML page: curves, lineage tree, course map and replays; with several runs, a page comparing them')
    .argument('<run-dir...>', 'run directory (its newest valid checkpoint; works while the run goes on); several: compare them (median and range of their curves, final figures)')
    .option('--out <file>', 'HTML file (default <run-dir>/report/index.html; for several runs compare/index.html beside the first)');
  workersOption(report, 'worker threads for the replays')
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
