import type { Batch, Evaluator, Task } from '../pool/index.js';
import type { RolloutOptions, RolloutResult } from '../sim/index.js';
import type { Course } from '../terrain/index.js';
import { courseOf, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { planEsStep, type PlannedEsStep } from './es-batch.js';
import type { EsState } from '../evolve/index.js';
import type { CourseRecord } from './state.js';

declare const handleKind: unique symbol;
/** An index into one of a phase batch's tables, typed by what it indexes so one cannot stand for another. */
type Handle<K extends string> = number & { readonly [handleKind]: K };
export type CourseHandle = Handle<'course'>;
export type OptionsHandle = Handle<'options'>;
export type BaseHandle = Handle<'base'>;
export type TaskHandle = Handle<'task'>;

/** Which solver a rollout runs under: the run's own, or the stricter one used to confirm solves. */
export type Solver = 'run' | 'strict';

/**
 * The solver a course's walkers are trained and compared under: the run's own until a
 * confirmation on the course has been tried, the stricter one from then on, so its walker grows
 * robust instead of exploiting the run's own solver, and a transfer is judged by the same physics
 * the holder trains under.
 */
export function courseSolver(c: Pick<CourseRecord, 'confirmTries'>): Solver {
  return c.confirmTries > 0 ? 'strict' : 'run';
}

/**
 * The rollouts one phase of an iteration plans: courses and base vectors are added once and
 * referred to by handle; rollout options are named by solver and push, not by slot number.
 * `run` evaluates them, counts them in the draft, and returns results read by task handle.
 */
export class PhaseBatch {
  private readonly courses: Course[] = [];
  private readonly bases: number[][] = [];
  private readonly options: RolloutOptions[] = [];
  private readonly tasks: Task[] = [];
  private readonly courseIndex = new Map<number, CourseHandle>();
  private readonly optionIndex = new Map<string, OptionsHandle>();

  /** `source.courses` is read when a course is first added, so records admitted earlier in the iteration are found. */
  constructor(private readonly ctx: RunContext, private readonly source: { readonly courses: readonly CourseRecord[] }) {}

  /** The admitted course `id`. */
  course(id: number): CourseHandle {
    let h = this.courseIndex.get(id);
    if (h === undefined) {
      h = (this.courses.push(courseOf(this.ctx, this.source.courses, id)) - 1) as CourseHandle;
      this.courseIndex.set(id, h);
    }
    return h;
  }

  /** A course not (yet) admitted: a candidate. */
  candidate(c: Course): CourseHandle {
    return (this.courses.push(c) - 1) as CourseHandle;
  }

  /** A weight vector that perturbed candidates are built from (an ES mean). */
  base(params: readonly number[]): BaseHandle {
    return (this.bases.push([...params]) - 1) as BaseHandle;
  }

  /** Episode settings under `solver`, with a horizontal push of `push` N·s on the torso at the start (0 = none). */
  episode(solver: Solver = 'run', push = 0): OptionsHandle {
    const key = `${solver}/${push}`;
    let h = this.optionIndex.get(key);
    if (h === undefined) {
      const o = solver === 'run' ? this.ctx.rollout : this.ctx.strictRollout;
      h = (this.options.push(push === 0 ? o : { ...o, push }) - 1) as OptionsHandle;
      this.optionIndex.set(key, h);
    }
    return h;
  }

  /** One rollout of fixed weights. */
  rollout(course: CourseHandle, params: readonly number[], episode: OptionsHandle = this.episode()): TaskHandle {
    return (this.tasks.push({ kind: 'rollout', course, plan: 0, shape: 0, options: episode, policy: { kind: 'params', params } }) - 1) as TaskHandle;
  }

  /** One ES step of `state` on `course`: the mean under `meanEpisode`, its mirrored candidates under `episode`. */
  esStep(state: EsState, course: CourseHandle, episode: OptionsHandle = this.episode(), meanEpisode: OptionsHandle = episode): PlannedEsStep {
    return planEsStep(state, this.ctx.es, { course, plan: 0, shape: 0, options: episode, meanOptions: meanEpisode, base: this.base(state.mean) }, this.tasks);
  }

  get size(): number {
    return this.tasks.length;
  }

  batch(): Batch {
    return { courses: this.courses, plans: [this.ctx.plan], shapes: [this.ctx.shape], options: this.options, bases: this.bases, tasks: this.tasks };
  }

  /** Evaluates every planned rollout and counts them (rollouts, physics steps) in `draft`, and each admitted course's rollouts on its record. */
  async run(evaluator: Evaluator, draft: Draft): Promise<PhaseResults> {
    const all = this.tasks.length === 0 ? [] : await evaluator.evaluate(this.batch());
    draft.count(all);
    const idOf = new Map([...this.courseIndex].map(([id, h]) => [h, id]));
    const perCourse = new Map<number, number>();
    for (const t of this.tasks) {
      const id = idOf.get(t.course as CourseHandle);
      if (id !== undefined) perCourse.set(id, (perCourse.get(id) ?? 0) + 1);
    }
    for (const [id, n] of perCourse) draft.addCourseRollouts(id, n);
    return new PhaseResults(all);
  }
}

/** A phase batch's results, read by the handles its tasks were planned with. */
export class PhaseResults {
  constructor(readonly all: readonly RolloutResult[]) {}

  get(t: TaskHandle): RolloutResult {
    return this.all[t];
  }

  progress(t: TaskHandle): number {
    return this.all[t].progress;
  }
}
