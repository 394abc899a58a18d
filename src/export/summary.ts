import { toCsv } from './csv.js';

interface Entry {
  id: number; parent: number | null; admittedAt: number; status: string; difficulty: number; descriptor: readonly number[];
  genome: { features: readonly { kind: string }[] }; best: { progress: number; walker: { id: number } }; solvedAt: number | null;
  crossedAt: number | null; rollouts: number; lineageRollouts: number;
  admission: { bestProgress: number; novelty: number };
}

/** `gapWidth` → `gap_width`: every summary.csv header is in snake case, descriptor names included. */
export function snakeCase(name: string): string {
  return name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}

/** summary.csv: one row per course with the headline figures, in curriculum order. */
export function summaryCsv(courses: readonly Entry[], descriptorNames: readonly string[]): string {
  const header = ['order', 'course_id', 'parent_id', 'admitted_at', 'status', 'difficulty', 'features', 'kinds', ...descriptorNames.map(snakeCase), 'admission_best_progress', 'admission_novelty', 'best_progress', 'best_walker', 'solved_at', 'crossed_at', 'rollouts', 'lineage_rollouts'];
  const rows = courses.map((c, i) => [
    i + 1, c.id, c.parent, c.admittedAt, c.status, c.difficulty, c.genome.features.length,
    c.genome.features.map((f) => f.kind).join(' '), ...c.descriptor,
    c.admission.bestProgress, c.admission.novelty, c.best.progress, c.best.walker.id, c.solvedAt,
    c.crossedAt, c.rollouts, c.lineageRollouts,
  ]);
  return toCsv(header, rows);
}
