import type { Command } from 'commander';
import { plural } from '../../core/index.js';
import { runBaseline, type BaselineReport } from '../../run/index.js';
import { backendOf, workersOption } from '../backend.js';
import { EXIT } from '../fail.js';
import { intIn, seedList } from '../options.js';
import { Progress } from '../progress.js';
import { installStopHandlers } from '../signals.js';

interface BaselineFlags { top: number; seeds: number[]; rollouts?: number; out?: string; workers: number; quiet?: boolean; json?: boolean }

const cols = ['course', 'difficulty', 'budget', 'co-evolved', 'solved', 'direct median [min, max]', 'confirmed', 'verdict'];
const widths = [8, 12, 9, 12, 8, 26, 11, 0];

function table(r: BaselineReport): string[] {
  const s = r.settings;
  const budget = s.budget === 'lineage' ? 'the rollouts the run spent on each course\'s lineage' : `${s.budget} rollouts`;
  const row = (cells: string[]): string => cells.map((c, i) => c.padEnd(widths[i])).join('').trimEnd();
  const lines = [
    `direct baseline of ${r.source.path} (iteration ${r.source.iteration}, fingerprint ${r.source.fingerprint.slice(0, 12)})`,
    `${plural(r.rows.length, 'hardest crossed course')}, seeds ${s.seeds.join(', ')}; budget per course and seed: ${budget}`,
    row(cols),
  ];
  for (const x of r.rows) {
    const d = x.direct;
    lines.push(row([
      String(x.course), x.difficulty.toFixed(4), String(x.budget), x.coevolved.progress.toFixed(3), x.coevolved.confirmed ? 'yes' : 'no',
      `${d.median.toFixed(3)} [${d.min.toFixed(3)}, ${d.max.toFixed(3)}]`, `${d.confirmed}/${d.seeds.length}`, x.verdict,
    ]));
  }
  return lines;
}

async function baselineAction(source: string, o: BaselineFlags): Promise<void> {
  const progress = new Progress(o.quiet === true);
  const stops = installStopHandlers((s) => progress.note(s.replace('this iteration', 'this ES iteration (finished courses and seeds are kept)')));
  try {
    const out = await runBaseline(source, { top: o.top, seeds: o.seeds, rollouts: o.rollouts, out: o.out }, backendOf(o), {
      stopRequested: () => stops.requested() !== null,
      onSkip: (course, seed) => progress.note(`course ${course}, seed ${seed}: finished earlier, skipped`),
      onIteration: ({ course, seed, line, iterations }) => progress.update(`course ${course}  seed ${seed}  iteration ${line.iteration}/${iterations}  progress ${line.progress.toFixed(3)}  rollouts ${line.rollouts}`),
    });
    progress.done();
    const stopped = stops.requested();
    if (!out.report) {
      process.stderr.write(`cairn: stopped; ${plural(out.trained, 'finished course and seed')} saved in ${out.dir} (give the same command again to continue)\n`);
      process.exitCode = stopped === 'sigterm' ? EXIT.sigterm : EXIT.sigint;
      return;
    }
    if (o.json) process.stdout.write(`${JSON.stringify(out.report)}\n`);
    else process.stdout.write(`${[...table(out.report), `written to ${out.dir}`].join('\n')}\n`);
  } finally {
    stops.remove();
  }
}

export function registerBaseline(program: Command): void {
  const cmd = program
    .command('baseline')
    .description('direct baseline: fresh walkers trained by plain ES directly on the hardest crossed courses of a run or export, under a stated rollout budget')
    .argument('<source>', 'run directory or curriculum export')
    .option('--top <k>', 'how many of the hardest crossed or solved courses', intIn(1, 10_000), 4)
    .option('--seeds <list>', 'seeds of the fresh walkers, e.g. 1-3 or 1,4,9', seedList, [1, 2, 3])
    .option('--rollouts <n>', "rollout budget per course and seed (default: the rollouts the run spent on the course's lineage)", intIn(1, 1e12))
    .option('--out <dir>', 'where baseline.json, baseline.csv and the results file go (default: the source directory)');
  workersOption(cmd)
    .option('--quiet', 'no progress on stderr')
    .option('--json', 'print the JSON report instead of the table')
    .action(baselineAction);
}
