import type { Command } from 'commander';
import { loadBodyPlan } from '../../body/index.js';
import { UserError } from '../../core/index.js';
import { lookup, namedCourse, openSource, type LookupConfirm, type LookupResult } from '../../run/index.js';
import { backendOf, workersOption } from '../backend.js';
import { intIn } from '../options.js';

interface LookupOptions { course: string; family?: string; body?: string; steps?: number; top?: number; json?: boolean; workers: number; confirm?: boolean; seed: number }

function table(r: LookupResult, top: number, confirming: boolean): string[] {
  const confirmHead = confirming ? `${'confirmed'.padEnd(11)}${'checks'.padEnd(22)}` : '';
  const lines = [`${'rank'.padEnd(6)}${'walker'.padEnd(8)}${'iteration'.padEnd(11)}${'progress'.padEnd(10)}${'fell'.padEnd(6)}${'steps'.padEnd(7)}${'ended'.padEnd(10)}${confirmHead}courses`];
  r.ranked.slice(0, top).forEach((row, i) => {
    const { walker: w, result: x, confirmation: c } = row;
    const confirmCells = c ? `${(c.ok ? 'yes' : 'no').padEnd(11)}${c.checks.map((v) => v.toFixed(3)).join(' ').padEnd(22)}` : '';
    lines.push(`${String(i + 1).padEnd(6)}${String(w.walkerId).padEnd(8)}${String(w.iteration).padEnd(11)}${x.progress.toFixed(4).padEnd(10)}${(x.fell ? 'yes' : 'no').padEnd(6)}${String(x.steps).padEnd(7)}${x.end.padEnd(10)}${confirmCells}${w.courses.join(', ')}`);
  });
  for (const s of r.skipped) lines.push(`skipped walker ${s.walker.walkerId} (iteration ${s.walker.iteration}): ${s.reason}`);
  return lines;
}

async function lookupAction(sourcePath: string, o: LookupOptions): Promise<void> {
  const src = openSource(sourcePath);
  const target = namedCourse(o.course, o.family);
  const plan = o.body ? loadBodyPlan(o.body) : src.plan;
  const rollout = { ...src.rollout, maxSteps: o.steps ?? src.rollout.maxSteps };
  let confirm: LookupConfirm | undefined;
  if (o.confirm) {
    if (!src.training) throw new UserError(`--confirm: ${src.path} does not record its run's solve settings (an export written by an older version); export the run again`);
    if (src.training.solve.checks === 0) throw new UserError(`--confirm: the run of ${src.path} confirms with 0 checks (solve.checks), so there is nothing to confirm with`);
    confirm = { rule: src.training.solve, seed: o.seed };
  }
  const r = await lookup(src, target.course, plan, rollout, backendOf(o), confirm);
  const top = o.top ?? r.ranked.length;
  if (o.json) {
    const row = (x: LookupResult['ranked'][number]) => ({
      walkerId: x.walker.walkerId, iteration: x.walker.iteration, courses: x.walker.courses, progress: x.result.progress, fell: x.result.fell, steps: x.result.steps, end: x.result.end,
      ...(x.confirmation ? { confirmed: x.confirmation.ok, checks: x.confirmation.checks, pushes: x.confirmation.pushes } : {}),
    });
    const skipped = r.skipped.map((s) => ({ walkerId: s.walker.walkerId, iteration: s.walker.iteration, courses: s.walker.courses, reason: s.reason }));
    process.stdout.write(`${JSON.stringify({ source: src.path, fingerprint: src.fingerprint, course: target.label, body: plan.name, maxSteps: rollout.maxSteps, walkers: r.ranked.length + r.skipped.length, ...(confirm ? { confirm: { ...confirm.rule, seed: confirm.seed } } : {}), ranked: r.ranked.slice(0, top).map(row), skipped })}\n`);
    return;
  }
  const head = `${r.ranked.length + r.skipped.length} walkers of ${src.path} on ${target.label} with body "${plan.name}" (${rollout.maxSteps} steps at most)`;
  const rule = confirm ? [`confirmed as the run confirms solves: ${confirm.rule.checks} rollouts under the stricter solver, pushes up to ${confirm.rule.push} N·s drawn with seed ${confirm.seed}, every one at progress ≥ ${confirm.rule.threshold}`] : [];
  process.stdout.write(`${[head, ...rule, ...table(r, top, confirm !== undefined)].join('\n')}\n`);
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
    .option('--top <k>', 'show only the best k', intIn(1, 1_000_000))
    .option('--confirm', "also confirm every walker as the source run confirms solves (stricter solver, pushed checks) and rank confirmed walkers first")
    .option('--seed <n>', 'seed of the confirmation pushes', intIn(0, 2 ** 31 - 1), 1);
  workersOption(cmd)
    .option('--json', 'print one JSON object')
    .action(lookupAction);
}
