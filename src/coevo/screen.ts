/** One evaluated candidate the screen remembers: when, where (normalised descriptor), and whether it was too easy. */
export interface ScreenEntry {
  readonly iteration: number;
  readonly point: readonly number[];
  readonly tooEasy: boolean;
}

function squaredDistance(a: readonly number[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return s;
}

/**
 * Whether a proposal at `point` is predicted too easy: its `k` nearest remembered candidates
 * (Euclidean distance in the normalised descriptor; ties by age, oldest first) were all too
 * easy. Needs at least `k` entries; with fewer it predicts nothing. A nearest-neighbour
 * surrogate in the sense of surrogate-assisted evolutionary search: it only decides which
 * proposals get rollouts, never admits anything itself.
 */
export function predictedTooEasy(point: readonly number[], memory: readonly ScreenEntry[], k: number): boolean {
  if (memory.length < k) return false;
  const near = memory.map((m, i) => ({ d: squaredDistance(point, m.point), i, easy: m.tooEasy }));
  near.sort((a, b) => a.d - b.d || a.i - b.i);
  return near.slice(0, k).every((n) => n.easy);
}

/** The entries still inside the screen's window at `iteration`: those from iteration − `window` on. */
export function withinWindow(memory: readonly ScreenEntry[], iteration: number, window: number): ScreenEntry[] {
  return memory.filter((m) => m.iteration >= iteration - window);
}
