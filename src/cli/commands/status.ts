import type { Command } from 'commander';
import { Run, runStatus, type RunStatus } from '../../run/index.js';
import type { LiveRecord } from '../../store/index.js';
import { DESCRIPTOR_NAMES } from '../../terrain/index.js';
import { plural } from '../../core/index.js';

interface StatusOptions { json?: boolean }

/** The descriptor's non-zero components, e.g. "gapWidth 0.42, stepUp 0.10". */
function highlights(d: readonly number[]): string {
  const parts = d.flatMap((v, i) => (v > 0 && DESCRIPTOR_NAMES[i] !== 'count' ? [`${DESCRIPTOR_NAMES[i]} ${v.toFixed(2)}`] : []));
  return parts.length > 0 ? parts.join(', ') : 'flat';
}

/** "running (pid 812) on queue "cairn" at redis://…: 3 workers (48 threads), 912 rollouts/s", or "not running". */
function liveLine(l: LiveRecord | null): string {
  if (!l) return 'not running';
  const who = l.workers !== undefined ? `${plural(l.workers, 'worker')} (${plural(l.threads ?? 0, 'thread')}), ` : '';
  const now = l.waiting ?? `${who}${Math.round(l.rolloutsPerSecond ?? 0)} rollouts/s`;
  return `running (pid ${l.pid}) on ${l.backend}: ${now} (as of ${l.updated})`;
}

const hardest = (d: number | null): string => (d === null ? 'none' : `difficulty ${d.toFixed(3)}`);

/** The run's measures in words: crossed, new ground, coverage, lineages alive, wasted candidates. */
function measureLines(s: RunStatus): string[] {
  const lineages = s.liveLineages.map((l) => `${l.id} ${l.kind} (${plural(l.active.length, 'active course')}, hardest ${l.hardestActive.toFixed(3)})`);
  const share = s.tooEasyShare === null ? '' : ` (${(100 * s.tooEasyShare).toFixed(1)}% wasted)`;
  return [
    `hardest crossed course: ${hardest(s.hardestCrossed)}`,
    `new ground ${s.newGround}; coverage ${s.coverage} of ${s.grid.cells} cells (${s.grid.components.join(', ')}; ${s.grid.bins} bins each)`,
    `${plural(s.liveLineages.length, 'lineage')} alive${lineages.length > 0 ? ` (by first course): ${lineages.join('; ')}` : ''}`,
    `${plural(s.candidates, 'candidate')}, ${s.tooEasy} refused as too easy${share}${s.screened !== undefined ? `; ${s.screened} more proposals screened out before rollouts as predicted too easy` : ''}`,
  ];
}

function statusAction(dir: string, o: StatusOptions): void {
  const run = Run.open(dir);
  const { state, skipped } = run.latest();
  const { status: s, pairs } = runStatus(run, state, skipped);
  if (o.json) {
    process.stdout.write(`${JSON.stringify(s)}\n`);
    return;
  }
  const lines = [
    `run ${run.dir}`,
    `iteration ${state.iteration} of ${s.targetIterations}; ${plural(s.activePairs, 'active pair')}; ${plural(s.admitted, 'course')} admitted; ${s.archived} archived; ${s.crossed} crossed; ${s.solved} solved; ${plural(s.takeovers, 'takeover')}`,
    `hardest solved course: ${hardest(s.hardestSolved)}; rollouts ${s.rollouts.toLocaleString('en-US')}`,
    ...measureLines(s),
    `fingerprint ${s.fingerprint}`,
    liveLine(s.live),
    '',
    `${'course'.padEnd(7)}${'parent'.padEnd(8)}${'age'.padEnd(6)}${'walker'.padEnd(8)}${'progress'.padEnd(10)}${'solved'.padEnd(8)}${'difficulty'.padEnd(12)}features`,
  ];
  for (const p of pairs) {
    const c = p.course;
    lines.push(
      `${String(c.id).padEnd(7)}${String(c.parent ?? '-').padEnd(8)}${String(p.age).padEnd(6)}${String(p.walkerId).padEnd(8)}` +
        `${p.progress.toFixed(3).padEnd(10)}${(c.solvedAt !== null ? `@${c.solvedAt}` : 'no').padEnd(8)}${p.difficulty.toFixed(3).padEnd(12)}` +
        `${c.genome.features.length}: ${highlights(c.descriptor)}`,
    );
  }
  for (const b of s.sources ?? []) {
    lines.push(`course ${b.courseId} branched from ${b.path} (run ${b.fingerprint.slice(0, 16)}…, course ${b.sourceCourseId})${b.clipped ? ', clipped into this family' : ''}`);
  }
  for (const k of skipped) lines.push(`note: skipped checkpoint ${k.file}: ${k.reason}`);
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
