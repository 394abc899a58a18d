import { KIND_NAMES, type FeatureKind, type TerrainGenome } from '../terrain/index.js';
import type { CourseRecord, RunState } from './state.js';

/**
 * A lineage is a subtree of the course tree: a starting course on its own, or one child of a
 * starting course with everything descended from it. `lineageOf` names a lineage by the id of
 * that course.
 */
export function lineageOf(courses: readonly CourseRecord[], id: number): number {
  const l = lineages(courses).get(id);
  if (l === undefined) throw new Error(`no course ${id}`);
  return l;
}

/** The lineage of every course, by id (see lineageOf). Parents are admitted before their children. */
export function lineages(courses: readonly CourseRecord[]): Map<number, number> {
  const out = new Map<number, number>();
  const byId = new Map(courses.map((c) => [c.id, c]));
  for (const c of courses) {
    const parent = c.parent === null ? undefined : byId.get(c.parent);
    out.set(c.id, !parent || parent.parent === null ? c.id : out.get(parent.id)!);
  }
  return out;
}

/**
 * Rollouts spent on each course's line of descent, by id: its own `rollouts` plus those of its
 * parent, grandparent and so on up to its starting course. Parents are admitted before their
 * children, so one pass in admission order suffices.
 */
export function lineageRollouts(courses: readonly CourseRecord[]): Map<number, number> {
  const out = new Map<number, number>();
  for (const c of courses) out.set(c.id, c.rollouts + (c.parent === null ? 0 : out.get(c.parent) ?? 0));
  return out;
}

/** Number of admitted children of each course, by id. */
export function childCounts(courses: readonly CourseRecord[]): Map<number, number> {
  const out = new Map<number, number>();
  for (const c of courses) if (c.parent !== null) out.set(c.parent, (out.get(c.parent) ?? 0) + 1);
  return out;
}

/** Features of each kind in `genome`, in registration order. */
function kindCounts(genome: TerrainGenome): Map<FeatureKind, number> {
  const n = new Map<FeatureKind, number>(KIND_NAMES.map((k) => [k, 0]));
  for (const f of genome.features) n.set(f.kind, n.get(f.kind)! + 1);
  return n;
}

/**
 * The feature kind a set of genomes is mostly made of: the kind with the most features over
 * all of them (ties: the earlier registered kind); 'none' when they have no features.
 */
export function dominantKind(genomes: readonly TerrainGenome[]): FeatureKind | 'none' {
  const total = new Map<FeatureKind, number>(KIND_NAMES.map((k) => [k, 0]));
  for (const g of genomes) for (const [k, n] of kindCounts(g)) total.set(k, total.get(k)! + n);
  let best: FeatureKind | 'none' = 'none';
  let most = 0;
  for (const k of KIND_NAMES) if (total.get(k)! > most) [best, most] = [k, total.get(k)!];
  return best;
}

/** One lineage with an active pair. */
export interface LiveLineage {
  /** The id of the lineage's first course (see lineageOf). */
  readonly id: number;
  /** Its active courses, by id. */
  readonly active: readonly number[];
  /** Every course admitted in it so far. */
  readonly courses: number;
  /** The dominant kind of its active courses' genomes. */
  readonly kind: FeatureKind | 'none';
  /** The largest difficulty among its active courses. */
  readonly hardestActive: number;
}

/** Lineages that hold at least one active pair, in order of their first course's id. */
export function liveLineages(state: RunState, difficultyOf: (g: TerrainGenome) => number): LiveLineage[] {
  const groups = new Map<number, { active: number[]; courses: number }>();
  const of = lineages(state.courses);
  for (const c of state.courses) {
    const id = of.get(c.id)!;
    const g = groups.get(id) ?? { active: [], courses: 0 };
    g.courses++;
    groups.set(id, g);
  }
  const byId = new Map(state.courses.map((c) => [c.id, c]));
  for (const p of state.pairs) groups.get(of.get(p.courseId)!)!.active.push(p.courseId);
  return [...groups.entries()]
    .filter(([, g]) => g.active.length > 0)
    .sort(([a], [b]) => a - b)
    .map(([id, g]) => {
      const active = [...g.active].sort((a, b) => a - b);
      const genomes = active.map((c) => byId.get(c)!.genome);
      return { id, active, courses: g.courses, kind: dominantKind(genomes), hardestActive: Math.max(...genomes.map(difficultyOf)) };
    });
}
