import { fingerprint, initialState, makeContext, metricsOf, type IterationMetrics, type RunContext, type RunState } from '../coevo/index.js';
import { UserError } from '../core/index.js';
import {
  createRunDir, loadNewestCheckpoint, openRunDir, readLines, updateBudget, writeCheckpoint, METRICS,
  type RunInputs, type RunOverrides, type SkippedCheckpoint,
} from '../store/index.js';
import { join } from 'node:path';
import { resolveSources } from './branch.js';

/** A run's newest verified state, with the newer checkpoints that failed verification. */
export interface Opened {
  readonly state: RunState;
  readonly skipped: readonly SkippedCheckpoint[];
}

/**
 * One run: its directory and frozen inputs, and everything derived from them (policy shape, ES
 * settings, rollout options, recipe hash) built once, here. Commands, the loop, the report
 * and the export all work from a Run.
 */
export class Run {
  private constructor(readonly inputs: RunInputs, readonly ctx: RunContext) {}

  /** Validates a recipe and what it names, then creates the run directory (nothing is written on bad input). */
  static create(recipePath: string, out: string | undefined, overrides: RunOverrides): Run {
    return Run.of(createRunDir(recipePath, out, overrides, resolveSources));
  }

  /** An existing run directory (read-only: no lock is taken). */
  static open(dir: string): Run {
    return Run.of(openRunDir(dir));
  }

  static of(inputs: RunInputs): Run {
    return new Run(inputs, makeContext(inputs.recipe, inputs.family, inputs.plan, inputs.sources));
  }

  get dir(): string {
    return this.inputs.dir;
  }

  get recipeHash(): string {
    return this.ctx.recipeHash;
  }

  /** The state every run of this recipe starts from. */
  initialState(): RunState {
    return initialState(this.ctx);
  }

  fingerprint(state: RunState): string {
    return fingerprint(state, this.ctx.recipeHash);
  }

  metrics(state: RunState): IterationMetrics {
    return metricsOf(state, this.ctx);
  }

  /** The newest checkpoint that verifies, or null state when there is none. */
  newest(): { state: RunState | null; skipped: SkippedCheckpoint[] } {
    return loadNewestCheckpoint(this.dir, this.ctx.recipeHash);
  }

  /** The newest verified state; a run with none is refused. */
  latest(): Opened {
    const { state, skipped } = this.newest();
    if (!state) {
      const why = skipped.map((s) => `${s.file}: ${s.reason}`);
      if (why.length === 0) throw new UserError(`Run directory ${this.dir} has no readable checkpoint: it was stopped before writing its first one; \`cairn resume ${this.dir}\` starts it from iteration 0`);
      throw new UserError(`Run directory ${this.dir} has no readable checkpoint:`, why);
    }
    return { state, skipped };
  }

  checkpoint(state: RunState): void {
    writeCheckpoint(this.dir, state, this.ctx.recipeHash, this.inputs.recipe.checkpoint.keep);
  }

  /** The same run with a new budget, written into its frozen recipe (the only part a resume may change). */
  withBudget(iterations: number, minutes: number): Run {
    return new Run(updateBudget(this.inputs, iterations, minutes), this.ctx);
  }

  /** metrics.jsonl up to `iteration`. */
  metricsLog(iteration: number): IterationMetrics[] {
    return readLines<IterationMetrics>(join(this.dir, METRICS)).filter((m) => m.iteration <= iteration);
  }
}
