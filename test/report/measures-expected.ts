/**
 * What the measures of a run should be, worked out from its checkpointed courses by the
 * README's definitions (*Crossed, solved and the run's measures*), without cairn's measure
 * functions: only the descriptor, its family bounds and the feature kinds' order come from cairn.
 * Courses are never deleted and crossedAt / solvedAt are set once, so the figures at an earlier
 * iteration i follow from the final state: the courses crossed or solved at or before i.
 */
import type { CourseRecord } from '../../src/coevo/index.js';
import type { OpenedRun } from '../../src/store/index.js';
import { descriptor, descriptorBounds, DESCRIPTOR_NAMES, KIND_NAMES, type TerrainGenome } from '../../src/terrain/index.js';

export interface Expected {
  readonly components: readonly string[];
  readonly bins: number;
  /** Indexed by iteration 0 … last. */
  readonly crossed: number[];
  readonly solved: number[];
  readonly newGround: number[];
  /** Covered cells at each iteration: key "b0,b1,…" → the hardest solved course in it and its difficulty. */
  readonly cells: Map<string, { hardest: number; difficulty: number }>[];
  readonly hardestCrossed: number | null;
  readonly hardestSolved: number | null;
  readonly lineageOf: Map<number, number>;
  /** Each lineage's kind: of its active courses while alive, else of all its courses. */
  readonly kindOf: Map<number, string>;
  readonly live: { id: number; kind: string; active: number[] }[];
}

/** The feature kind with the most features over `genomes` (ties: the earlier kind), 'none' without features. */
function dominant(genomes: readonly TerrainGenome[]): string {
  const count = KIND_NAMES.map((k) => genomes.reduce((a, g) => a + g.features.filter((f) => f.kind === k).length, 0));
  const most = Math.max(0, ...count);
  return most === 0 ? 'none' : KIND_NAMES[count.indexOf(most)];
}

export function expectations(run: OpenedRun): Expected {
  const { courses, pairs, iteration } = run.state;
  const { family, recipe } = run.inputs;
  const bounds = descriptorBounds(family);
  const norm = (c: CourseRecord) => descriptor(c.genome).map((v, i) => (bounds[i] > 0 ? v / bounds[i] : 0));
  const diff = (c: CourseRecord) => norm(c).reduce((a, v) => a + v, 0) / bounds.length;
  const { components, bins } = recipe.measures.grid;
  const at = components.map((name) => DESCRIPTOR_NAMES.indexOf(name));
  const iterations = Array.from({ length: iteration + 1 }, (_, i) => i);
  const solvedBy = (i: number) => courses.filter((c) => c.solvedAt !== null && c.solvedAt <= i).sort((a, b) => a.solvedAt! - b.solvedAt! || a.id - b.id);
  const newGround = iterations.map((i) => {
    const seen: number[][] = [];
    let count = 0;
    for (const c of solvedBy(i)) {
      const p = norm(c);
      if (seen.every((q) => Math.hypot(...p.map((v, k) => v - q[k])) > recipe.measures.newGroundDistance)) count++;
      seen.push(p);
    }
    return count;
  });
  const cells = iterations.map((i) => {
    const out = new Map<string, { hardest: number; difficulty: number }>();
    for (const c of solvedBy(i)) {
      const key = at.map((k) => Math.min(bins - 1, Math.floor(norm(c)[k] * bins))).join(',');
      const had = out.get(key);
      const d = diff(c);
      if (!had || d > had.difficulty || (d === had.difficulty && c.id < had.hardest)) out.set(key, { hardest: c.id, difficulty: d });
    }
    return out;
  });
  const byId = new Map(courses.map((c) => [c.id, c]));
  const lineageOf = new Map<number, number>();
  for (const c of courses) {
    let head = c;
    while (head.parent !== null && byId.get(head.parent)!.parent !== null) head = byId.get(head.parent)!;
    lineageOf.set(c.id, head.id);
  }
  const active = new Set(pairs.map((p) => p.courseId));
  const kindOf = new Map<number, string>();
  const live: Expected['live'] = [];
  for (const id of [...new Set(lineageOf.values())].sort((a, b) => a - b)) {
    const members = courses.filter((c) => lineageOf.get(c.id) === id);
    const alive = members.filter((c) => active.has(c.id));
    kindOf.set(id, dominant((alive.length > 0 ? alive : members).map((c) => c.genome)));
    if (alive.length > 0) live.push({ id, kind: kindOf.get(id)!, active: alive.map((c) => c.id).sort((a, b) => a - b) });
  }
  const hardest = (list: CourseRecord[]) => (list.some((c) => c.parent !== null) ? Math.max(...list.map(diff)) : null);
  return {
    components, bins, newGround, cells, lineageOf, kindOf, live,
    crossed: iterations.map((i) => courses.filter((c) => c.crossedAt !== null && c.crossedAt <= i).length),
    solved: iterations.map((i) => solvedBy(i).length),
    hardestCrossed: hardest(courses.filter((c) => c.crossedAt !== null)),
    hardestSolved: hardest(courses.filter((c) => c.solvedAt !== null)),
  };
}

/** A baseline.json in the documented format for the run's three hardest courses, one of each verdict. */
export function baselineFixture(run: OpenedRun) {
  const bounds = descriptorBounds(run.inputs.family);
  const diff = (c: CourseRecord) => descriptor(c.genome).reduce((a, v, i) => a + (bounds[i] > 0 ? v / bounds[i] : 0), 0) / bounds.length;
  const top = [...run.state.courses].sort((a, b) => diff(b) - diff(a) || a.id - b.id).slice(0, 3);
  const verdicts = ['direct ahead', 'co-evolved ahead', 'even'] as const;
  return {
    format: 'cairn-baseline', version: 1, source: { run: run.inputs.dir, iteration: run.state.iteration },
    settings: { top: 3, seeds: [1, 2, 3], budget: 'lineage' },
    rows: top.map((c, k) => {
      const progress = [0.31 + 0.2 * k, 0.52, 0.9 - 0.1 * k];
      return {
        course: c.id, difficulty: diff(c),
        coevolved: { progress: c.best.progress, crossedAt: c.crossedAt, solvedAt: c.solvedAt, confirmed: c.solvedAt !== null },
        budget: 1200 + 345 * k,
        direct: {
          seeds: progress.map((p, s) => ({ seed: s + 1, progress: p, finalProgress: p, rollouts: 1200, iterations: 30, confirmed: p >= 0.9 })),
          median: [...progress].sort((a, b) => a - b)[1], min: Math.min(...progress), max: Math.max(...progress), confirmed: progress.filter((p) => p >= 0.9).length,
        },
        verdict: verdicts[k],
      };
    }),
  };
}
