import type { Command } from 'commander';
import { fingerprint, makeContext, metricsOf } from '../../coevo/index.js';
import { DESCRIPTOR_NAMES, difficulty } from '../../terrain/index.js';
import { openRun } from '../../store/index.js';

interface StatusOptions { json?: boolean }

/** The descriptor's non-zero components, e.g. "gapWidth 0.42, stepUp 0.10". */
function highlights(d: readonly number[]): string {
  const parts = d.flatMap((v, i) => (v > 0 && DESCRIPTOR_NAMES[i] !== 'count' ? [`${DESCRIPTOR_NAMES[i]} ${v.toFixed(2)}`] : []));
  return parts.length > 0 ? parts.join(', ') : 'flat';
}

function statusAction(dir: string, o: StatusOptions): void {
  const { inputs, state, skipped } = openRun(dir);
  const ctx = makeContext(inputs.recipe, inputs.family, inputs.plan);
  const m = metricsOf(state, ctx);
  const fp = fingerprint(state, inputs.recipeHash);
  if (o.json) {
    process.stdout.write(`${JSON.stringify({ ...m, fingerprint: fp, targetIterations: inputs.recipe.budget.iterations, skippedCheckpoints: skipped.length })}\n`);
    return;
  }
  const lines = [
    `run ${inputs.dir}`,
    `iteration ${state.iteration} of ${inputs.recipe.budget.iterations}; ${m.activePairs} active pairs; ${m.admitted} courses admitted; ${m.archived} archived; ${m.solved} solved; ${m.takeovers} takeovers`,
    `hardest solved course: difficulty ${m.hardestSolved.toFixed(3)}; rollouts ${state.counters.rollouts.toLocaleString('en-US')}`,
    `fingerprint ${fp}`,
    '',
    `${'course'.padEnd(7)}${'parent'.padEnd(8)}${'age'.padEnd(6)}${'walker'.padEnd(8)}${'progress'.padEnd(10)}${'solved'.padEnd(8)}${'difficulty'.padEnd(12)}features`,
  ];
  for (const p of state.pairs) {
    const c = state.courses.find((r) => r.id === p.courseId)!;
    lines.push(
      `${String(c.id).padEnd(7)}${String(c.parent ?? '-').padEnd(8)}${String(state.iteration - c.admittedAt).padEnd(6)}${String(p.walkerId).padEnd(8)}` +
        `${p.progress.toFixed(3).padEnd(10)}${(c.solvedAt !== null ? `@${c.solvedAt}` : 'no').padEnd(8)}${difficulty(c.genome, inputs.family).toFixed(3).padEnd(12)}` +
        `${c.genome.features.length}: ${highlights(c.descriptor)}`,
    );
  }
  for (const s of skipped) lines.push(`note: skipped checkpoint ${s.file}: ${s.reason}`);
  process.stdout.write(`${lines.join('\n')}\n`);
}

export function registerStatus(program: Command): void {
  program
    .command('status')
    .description('summarise a run: counts, fingerprint and a table of active pairs')
    .argument('<run-dir>', 'run directory')
    .option('--json', 'print one JSON object')
    .action(statusAction);
}
