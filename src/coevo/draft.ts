import type { RolloutResult } from '../sim/index.js';
import type { ScreenEntry } from './screen.js';
import type { CourseRecord, PairState, RunEvent, RunState } from './state.js';

/** The working copy of a state during one iteration; `finish` turns it back into a plain, new state. */
export class Draft {
  pairs: PairState[];
  courses: CourseRecord[];
  nextCourseId: number;
  nextWalkerId: number;
  counters: { candidates: number; tooEasy: number; tooHard: number; takeovers: number; rollouts: number; steps: number; screened?: number };
  /** The admission screen's memory (undefined while the recipe has no screen). */
  screen: ScreenEntry[] | undefined;
  readonly events: RunEvent[] = [];
  /** Weights each pair's walker was evaluated with in this iteration's ES phase, by course id. */
  readonly evaluated = new Map<number, readonly number[]>();

  constructor(readonly base: RunState, readonly iteration: number) {
    this.pairs = [...base.pairs];
    this.courses = [...base.courses];
    this.nextCourseId = base.nextCourseId;
    this.nextWalkerId = base.nextWalkerId;
    this.counters = { ...base.counters };
    this.screen = base.screen ? [...base.screen] : undefined;
  }

  course(id: number): CourseRecord {
    const c = this.courses.find((r) => r.id === id);
    if (!c) throw new Error(`no course ${id}`);
    return c;
  }

  setCourse(rec: CourseRecord): void {
    this.courses[this.courses.findIndex((r) => r.id === rec.id)] = rec;
  }

  /** Raises a course's best-ever figure when `progress` beats it. */
  noteBest(courseId: number, progress: number, walkerId: number, params: readonly number[]): void {
    const c = this.course(courseId);
    if (progress > c.best.progress) this.setCourse({ ...c, best: { progress, walkerId, iteration: this.iteration, params: [...params] } });
  }

  /** Counts a batch's rollouts and physics steps. */
  count(results: readonly RolloutResult[]): void {
    this.counters.rollouts += results.length;
    for (const r of results) this.counters.steps += r.steps;
  }

  /** Adds `n` rollouts to course `id`'s own count. */
  addCourseRollouts(id: number, n: number): void {
    const c = this.course(id);
    this.setCourse({ ...c, rollouts: c.rollouts + n });
  }

  newWalkerId(): number {
    return this.nextWalkerId++;
  }

  finish(): RunState {
    return {
      format: 2,
      iteration: this.iteration,
      nextCourseId: this.nextCourseId,
      nextWalkerId: this.nextWalkerId,
      courses: this.courses,
      pairs: this.pairs,
      counters: { ...this.counters },
      screen: this.screen,
    };
  }
}
