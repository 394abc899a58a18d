/**
 * Centred-rank fitness shaping (Salimans, Ho, Chen, Sidor, Sutskever 2017, "Evolution
 * Strategies as a Scalable Alternative to Reinforcement Learning"):
 * fitnesses are replaced by their ranks scaled to [-0.5, 0.5], which makes the update blind to
 * the fitness scale and to outliers.
 */

/** Sort key: every non-finite fitness (NaN, ±Infinity) counts as the worst possible, on purpose. */
function key(f: number): number {
  return Number.isFinite(f) ? f : -Infinity;
}

/**
 * Centred ranks of `f`: u_i = rank_i / (n − 1) − 0.5 with rank 0 the worst, so the worst gets
 * −0.5, the best +0.5 and the values sum to zero. A single entry gets 0.
 *
 * - NaN and ±Infinity rank below every finite value (a failed evaluation must never look
 *   good; +Infinity is treated as a failure too, since no real fitness is infinite).
 * - Ties (including all non-finite entries among themselves) share the mean of the ranks they
 *   span. This is deterministic, keeps the sum at zero, and gives a mirrored pair with equal
 *   fitness equal utilities, so such a pair contributes nothing to the gradient instead of a
 *   direction chosen by index order.
 */
export function centredRanks(f: readonly number[]): number[] {
  const n = f.length;
  const u = new Array<number>(n).fill(0);
  if (n < 2) return u;
  const keys = f.map(key);
  const order = keys.map((_, i) => i).sort((a, b) => (keys[a] < keys[b] ? -1 : keys[a] > keys[b] ? 1 : a - b));
  let start = 0;
  while (start < n) {
    let end = start + 1;
    while (end < n && keys[order[end]] === keys[order[start]]) end++;
    const rank = (start + end - 1) / 2;
    for (let j = start; j < end; j++) u[order[j]] = rank / (n - 1) - 0.5;
    start = end;
  }
  return u;
}
