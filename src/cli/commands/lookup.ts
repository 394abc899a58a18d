import type { Command } from 'commander';
import { loadBodyPlan } from '../../body/index.js';
import { lookup, namedCourse, openSource, type LookupResult } from '../../run/index.js';
import { backendOf, workersOption } from '../backend.js';
import { intIn } from '../options.js';

interface LookupOptions { course: string; family?: string; body?: string; steps?: number; top?: number; json?: boolean; workers: number }

function table(r: LookupResult, top: number): string[] {
  const lines = [`${'rank'.padEnd(6)}${'walker'.padEnd(8)}${'iteration'.padEnd(11)}${'progress'.padEnd(10)}${'fell'.padEnd(6)}${'steps'.padEnd(7)}${'ended'.padEnd(10)}courses`];
  r.ranked.slice(0, top).forEach((row, i) => {
    const { walker: w, result: x } = row;
    lines.push(`${String(i + 1).padEnd(6)}${String(w.walkerId).padEnd(8)}${String(w.iteration).padEnd(11)}${x.progress.toFixed(4).padEnd(10)}${(x.fell ? 'yes' : 'no').padEnd(6)}${String(x.steps).padEnd(7)}${x.end.padEnd(10)}${w.courses.join(', ')}`);
  });
  for (const s of r.skipped) lines.push(`skipped walker ${s.walker.walkerId} (iteration ${s.walker.iteration}): ${s.reason}`);
  return lines;
}

async function lookupAction(sourcePath: string, o: LookupOptions): Promise<void> {
  const src = openSource(sourcePath);
  const target = namedCourse(o.course, o.family);
  const plan = o.body ? loadBodyPlan(o.body) : src.plan;
  const rollout = { ...src.rollout, maxSteps: o.steps ?? src.rollout.maxSteps };
  const r = await lookup(src, target.course, plan, rollout, backendOf(o));
  const top = o.top ?? r.ranked.length;
  if (o.json) {
    const row = (x: LookupResult['ranked'][number]) => ({ walkerId: x.walker.walkerId, iteration: x.walker.iteration, courses: x.walker.courses, progress: x.result.progress, fell: x.result.fell, steps: x.result.steps, end: x.result.end });
    const skipped = r.skipped.map((s) => ({ walkerId: s.walker.walkerId, iteration: s.walker.iteration, courses: s.walker.courses, reason: s.reason }));
    process.stdout.write(`${JSON.stringify({ source: src.path, fingerprint: src.fingerprint, course: target.label, body: plan.name, maxSteps: rollout.maxSteps, walkers: r.ranked.length + r.skipped.length, ranked: r.ranked.slice(0, top).map(row), skipped })}\n`);
    return;
  }
  const head = `${r.ranked.length + r.skipped.length} walkers of ${src.path} on ${target.label} with body "${plan.name}" (${rollout.maxSteps} steps at most)`;
  process.stdout.write(`${[head, ...table(r, top)].join('\n')}\n`);
}

export function registerLookup(program: Command): void {
  const cmd = program
    .command('lookup')
    .description("run every walker of a run or export on one course and rank them: which of the repertoire crosses it?")
    .argument('<run-or-export>', 'run directory, export directory or curriculum.json whose walkers to try')
    .requiredOption('--course <course>', 'terrain family (its start), genome file, or RUN_OR_EXPORT:COURSE_ID')
    .option('--family <file>', 'terrain family of a bare genome file')
    .option('--body <file>', "body plan to try them on (same joints and sensors; default the source's own)")
    .option('--steps <n>', "step budget of each rollout (default the source run's)", intIn(1, 10_000_000))
    .option('--top <k>', 'show only the best k', intIn(1, 1_000_000));
  workersOption(cmd)
    .option('--json', 'print one JSON object')
    .action(lookupAction);
}
