import { median } from '../core/index.js';
import { toCsv } from '../export/index.js';
import type { Source } from './sources.js';

export const BASELINE_FORMAT = 'cairn-baseline';
export const BASELINE_VERSION = 1;

/** Rollout budget of each course: the rollouts the run spent on its lineage, or a fixed number. */
export type BudgetSetting = 'lineage' | number;

export interface BaselineSettings {
  readonly top: number;
  readonly seeds: readonly number[];
  readonly budget: BudgetSetting;
}

/** One fresh walker trained directly on one course. */
export interface DirectSeed {
  readonly seed: number;
  /** Best progress of the ES mean over its training (the figure a co-evolved course's best progress is). */
  readonly progress: number;
  /** Progress of the final weights. */
  readonly finalProgress: number;
  /** Rollouts used: ES iterations, the final evaluation and the confirmation. */
  readonly rollouts: number;
  readonly iterations: number;
  /** The best walker held under the run's own solve confirmation. */
  readonly confirmed: boolean;
}

export type Verdict = 'co-evolved ahead' | 'direct ahead' | 'even';

export interface BaselineRow {
  readonly course: number;
  readonly difficulty: number;
  readonly coevolved: { readonly progress: number; readonly crossedAt: number | null; readonly solvedAt: number | null; readonly confirmed: boolean };
  readonly budget: number;
  readonly direct: { readonly seeds: readonly DirectSeed[]; readonly median: number; readonly min: number; readonly max: number; readonly confirmed: number };
  readonly verdict: Verdict;
}

export interface BaselineReport {
  readonly format: typeof BASELINE_FORMAT;
  readonly version: typeof BASELINE_VERSION;
  readonly source: { readonly path: string; readonly kind: Source['kind']; readonly fingerprint: string; readonly iteration: number };
  readonly settings: BaselineSettings;
  readonly rows: readonly BaselineRow[];
}

/**
 * Which side wins on one course, from the co-evolved course's best progress `p` and whether it
 * is solved (its crossing confirmed), against the direct seeds' best progress:
 *
 * - "direct ahead" when the direct median ≥ p, or when the direct best walkers are confirmed on
 *   a strict majority of seeds (more than half) while the co-evolved course is not confirmed;
 * - otherwise "co-evolved ahead" when p exceeds the direct maximum, or when the co-evolved course
 *   is confirmed and no direct seed is;
 * - otherwise "even" (p lies above the direct median but not above every seed, and the
 *   confirmations do not decide it).
 */
export function verdictOf(coevolved: { progress: number; confirmed: boolean }, direct: readonly DirectSeed[]): Verdict {
  const progress = direct.map((d) => d.progress);
  const confirmed = direct.filter((d) => d.confirmed).length;
  if (median(progress) >= coevolved.progress || (!coevolved.confirmed && confirmed > direct.length / 2)) return 'direct ahead';
  if (coevolved.progress > Math.max(...progress) || (coevolved.confirmed && confirmed === 0)) return 'co-evolved ahead';
  return 'even';
}

/** A row's direct figures and verdict from its seeds (in seed order). */
export function baselineRow(course: Omit<BaselineRow, 'direct' | 'verdict'>, seeds: readonly DirectSeed[]): BaselineRow {
  const progress = seeds.map((d) => d.progress);
  const direct = { seeds, median: median(progress), min: Math.min(...progress), max: Math.max(...progress), confirmed: seeds.filter((d) => d.confirmed).length };
  return { ...course, direct, verdict: verdictOf(course.coevolved, seeds) };
}

/** baseline.csv: one row per course (RFC 4180, snake_case headers). */
export function baselineCsv(report: BaselineReport): string {
  const header = ['course', 'difficulty', 'coevolved_progress', 'confirmed', 'crossed_at', 'solved_at', 'budget_rollouts', 'direct_median', 'direct_min', 'direct_max', 'direct_confirmed', 'seeds', 'verdict'];
  const rows = report.rows.map((r) => [
    r.course, r.difficulty, r.coevolved.progress, String(r.coevolved.confirmed), r.coevolved.crossedAt, r.coevolved.solvedAt, r.budget,
    r.direct.median, r.direct.min, r.direct.max, r.direct.confirmed, r.direct.seeds.length, r.verdict,
  ]);
  return toCsv(header, rows);
}
