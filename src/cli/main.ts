#!/usr/bin/env node
import { Command, CommanderError } from 'commander';
import { registerBench } from './commands/bench.js';
import { registerEval } from './commands/eval.js';
import { registerTrain } from './commands/train.js';
import { registerRun } from './commands/run.js';
import { registerStatus } from './commands/status.js';
import { registerExport } from './commands/export.js';
import { registerReport } from './commands/report.js';
import { registerWorker } from './commands/worker.js';
import { registerLookup } from './commands/lookup.js';
import { registerBaseline } from './commands/baseline.js';
import { EXIT, reportError } from './fail.js';

const program = new Command();
program
  .name('cairn')
  .description('Co-evolves 2D terrains and the walker controllers that cross them.')
  .version('0.1.0')
  .showHelpAfterError('(run with --help for usage)')
  .exitOverride()
  .configureOutput({ writeErr: (s) => process.stderr.write(s.startsWith('error:') ? `cairn: ${s}` : s) });
registerRun(program);
registerStatus(program);
registerExport(program);
registerReport(program);
registerEval(program);
registerLookup(program);
registerTrain(program);
registerBaseline(program);
registerBench(program);
registerWorker(program);
for (const c of program.commands) c.exitOverride();

try {
  await program.parseAsync(process.argv);
} catch (e) {
  if (e instanceof CommanderError) {
    process.exitCode = e.exitCode === 0 ? EXIT.ok : EXIT.badInput;
  } else {
    process.exitCode = reportError(e);
  }
}
