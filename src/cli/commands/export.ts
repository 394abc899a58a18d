import type { Command } from 'commander';
import { plural } from '../../core/index.js';
import type { Only, Order } from '../../export/index.js';
import { exportRun, Run } from '../../run/index.js';
import { oneOf } from '../options.js';

interface ExportOptions { out?: string; order: Order; only: Only; json?: boolean }

function exportAction(dir: string, o: ExportOptions): void {
  const run = Run.open(dir);
  const { state, skipped } = run.latest();
  for (const s of skipped) process.stderr.write(`cairn: skipped checkpoint ${s.file}: ${s.reason}; exporting an older one\n`);
  const r = exportRun(run, state, o.out, o.order, o.only);
  if (o.json) process.stdout.write(`${JSON.stringify({ ...r, iteration: state.iteration })}\n`);
  else process.stdout.write(`exported ${plural(r.courses, 'course')} and ${plural(r.walkers, 'walker')} (iteration ${state.iteration}) to ${r.dir}\n`);
}

export function registerExport(program: Command): void {
  program
    .command('export')
    .description('write the courses as an ordered curriculum (JSON with schema, CSV summary, walkers as safetensors)')
    .argument('<run-dir>', 'run directory (its newest valid checkpoint is exported)')
    .option('--out <dir>', 'export directory (default <run-dir>/exports/curriculum)')
    .option('--order <order>', 'admission or difficulty', oneOf(['admission', 'difficulty'] as const), 'admission')
    .option('--only <which>', 'solved, crossed (crossed or solved) or all courses', oneOf(['solved', 'crossed', 'all'] as const), 'all')
    .option('--json', 'print a JSON summary')
    .action(exportAction);
}
