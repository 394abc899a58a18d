import type { EsState } from '../evolve/index.js';
import type { TerrainGenome } from '../terrain/index.js';
import type { ScreenEntry } from './screen.js';

/** Outcome of one candidate terrain at admission. */
export type CandidateOutcome = 'admitted' | 'too-easy' | 'too-hard' | 'not-novel' | 'duplicate' | 'screened';

/** The best any walker did on a course so far, with the weights that did it. */
export interface BestOnCourse {
  readonly progress: number;
  readonly walkerId: number;
  readonly iteration: number;
  readonly params: readonly number[];
}

/** Everything known about one admitted course. Courses are never deleted: retired ones stay as archived. */
export interface CourseRecord {
  readonly id: number;
  /** Course this one was mutated from (null for the starting course). */
  readonly parent: number | null;
  readonly admittedAt: number;
  readonly genome: TerrainGenome;
  readonly descriptor: readonly number[];
  /** Minimal-criterion figures at admission: best current walker's progress and who did it. */
  readonly admission: { readonly bestProgress: number; readonly walkerId: number | null; readonly novelty: number };
  readonly best: BestOnCourse;
  /** First iteration at which some walker reached the solve threshold on it under the run's own solver (crossed), or null. */
  readonly crossedAt: number | null;
  /** First iteration whose walker solved it (crossing confirmed under the stricter solver and pushes), or null. */
  readonly solvedAt: number | null;
  /** Confirmation attempts made so far, and the iteration of the last one (null before the first). */
  readonly confirmTries: number;
  readonly lastConfirmAt: number | null;
  /** Rollouts run on this course (its pair's ES steps, confirmations, transfers onto it). */
  readonly rollouts: number;
  /** Mutation strength for this course's children: each child is the genome mutated about this many times (adapted after each admission round). */
  readonly mutationSteps: number;
  /** The walker whose confirmation made the course solved, with its weights. */
  readonly solvedBy: BestOnCourse | null;
  readonly archivedAt: number | null;
  /** Walkers that held the course, in order, with the iteration each took over. */
  readonly holders: readonly { readonly walkerId: number; readonly since: number; readonly how: 'seed' | 'zero-shot' | 'fine-tuned' }[];
  /** For a course a branched run started from: the source run's fingerprint and the course's id there (absent otherwise). */
  readonly source?: { readonly fingerprint: string; readonly courseId: number };
}

/** An active course with its incumbent walker and that walker's optimiser state. */
export interface PairState {
  readonly courseId: number;
  readonly walkerId: number;
  readonly es: EsState;
  /** Progress of the walker's mean at its last evaluation. */
  readonly progress: number;
}

/** The whole state of a run: plain data, replaced not mutated; its hash is the fingerprint. */
export interface RunState {
  readonly format: 2;
  /** Iterations completed. */
  readonly iteration: number;
  readonly nextCourseId: number;
  readonly nextWalkerId: number;
  /** Every admitted course, in admission order. */
  readonly courses: readonly CourseRecord[];
  /** Active pairs, in creation order. */
  readonly pairs: readonly PairState[];
  readonly counters: {
    readonly candidates: number;
    /** Candidates refused because the best walker's progress was above / below the admission band. */
    readonly tooEasy: number;
    readonly tooHard: number;
    readonly takeovers: number;
    readonly rollouts: number;
    readonly steps: number;
    /** Proposals skipped without rollouts as predicted too easy (present only when the recipe's admission.screen is on). */
    readonly screened?: number;
  };
  /** Evaluated candidates of the last admission.screen.window iterations (present only when the screen is on). */
  readonly screen?: readonly ScreenEntry[];
}

/** One record in events.jsonl. */
export type RunEvent =
  | { readonly type: 'candidate'; readonly iteration: number; readonly parent: number; readonly outcome: CandidateOutcome; readonly courseId: number | null; readonly bestProgress: number; readonly walkerId: number | null; readonly novelty: number | null; readonly descriptor: readonly number[] }
  | { readonly type: 'retired'; readonly iteration: number; readonly courseId: number; readonly walkerId: number; readonly progress: number }
  | { readonly type: 'takeover'; readonly iteration: number; readonly courseId: number; readonly fromCourse: number; readonly walkerId: number; readonly newWalkerId: number; readonly how: 'zero-shot' | 'fine-tuned'; readonly progress: number; readonly incumbentProgress: number }
  | { readonly type: 'crossed'; readonly iteration: number; readonly courseId: number; readonly walkerId: number; readonly progress: number }
  | { readonly type: 'solved'; readonly iteration: number; readonly courseId: number; readonly walkerId: number; readonly progress: number; readonly checks: readonly number[] }
  | { readonly type: 'unconfirmed'; readonly iteration: number; readonly courseId: number; readonly walkerId: number; readonly progress: number; readonly checks: readonly number[] };

/** One line of metrics.jsonl: nothing about wall-clock time, so logs of a resumed run match an uninterrupted one. */
export interface IterationMetrics {
  readonly iteration: number;
  readonly activePairs: number;
  readonly admitted: number;
  readonly archived: number;
  /** Courses crossed / solved so far (a solved course was crossed first). */
  readonly crossed: number;
  readonly solved: number;
  /** New ground: solved courses each farther than the recipe's distance from every course solved before it. */
  readonly newGround: number;
  /** Cells of the coverage grid holding a solved course. */
  readonly coverage: number;
  /** Lineages (subtrees under a starting course) with an active pair. */
  readonly lineages: number;
  readonly candidates: number;
  readonly tooEasy: number;
  /** Proposals skipped as predicted too easy (only when the recipe's admission.screen is on). */
  readonly screened?: number;
  readonly takeovers: number;
  readonly bestProgress: number;
  readonly medianProgress: number;
  /** Hardest solved / crossed course by the difficulty measure (0 when none). */
  readonly hardestSolved: number;
  readonly hardestCrossed: number;
  readonly rollouts: number;
  readonly steps: number;
}
