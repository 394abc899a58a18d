import type { Course } from '../terrain/index.js';

/**
 * Exact ray casts against a course's ground polyline and obstacles, without the physics
 * world: planck's `world.rayCast` allocates on every call and costs several microseconds a
 * ray; this walks only the ground segments inside the ray's x-extent (the polyline's x never
 * decreases, so a binary search finds them). Tested against `world.rayCast`.
 */
export class CourseRays {
  private readonly gx: Float64Array;
  private readonly gy: Float64Array;
  private readonly obstacles: { poly: Float64Array; minX: number; maxX: number; minY: number; maxY: number }[];

  constructor(course: Course) {
    const n = course.ground.length / 2;
    this.gx = new Float64Array(n);
    this.gy = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      this.gx[i] = course.ground[2 * i];
      this.gy[i] = course.ground[2 * i + 1];
    }
    this.obstacles = course.obstacles.map((p) => {
      const xs = p.filter((_, i) => i % 2 === 0);
      const ys = p.filter((_, i) => i % 2 === 1);
      return { poly: Float64Array.from(p), minX: Math.min(...xs), maxX: Math.max(...xs), minY: Math.min(...ys), maxY: Math.max(...ys) };
    });
  }

  /** Index of the last ground point with x < `x` (or 0). */
  private lowerIndex(x: number): number {
    let lo = 0;
    let hi = this.gx.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.gx[mid] < x) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  }

  /**
   * Fraction of `range` at which the ray from (ox, oy) along unit direction (dx, dy) first
   * meets the ground or an obstacle; 1 when it meets nothing within range.
   */
  cast(ox: number, oy: number, dx: number, dy: number, range: number): number {
    const ex = ox + dx * range;
    const ey = oy + dy * range;
    const minX = Math.min(ox, ex);
    const maxX = Math.max(ox, ex);
    let best = 1;
    const gx = this.gx;
    const gy = this.gy;
    const last = gx.length - 1;
    for (let i = this.lowerIndex(minX); i < last && gx[i] <= maxX; i++) {
      best = hitSegment(ox, oy, ex - ox, ey - oy, gx[i], gy[i], gx[i + 1], gy[i + 1], best);
    }
    const minY = Math.min(oy, ey);
    const maxY = Math.max(oy, ey);
    for (const o of this.obstacles) {
      if (o.maxX < minX || o.minX > maxX || o.maxY < minY || o.minY > maxY) continue;
      const p = o.poly;
      const m = p.length;
      for (let j = 0; j < m; j += 2) {
        const k = (j + 2) % m;
        best = hitSegment(ox, oy, ex - ox, ey - oy, p[j], p[j + 1], p[k], p[k + 1], best);
      }
    }
    return best;
  }
}

/** Smaller of `best` and the ray parameter t ∈ [0, 1] where o + t·r meets segment pq. */
function hitSegment(ox: number, oy: number, rx: number, ry: number, px: number, py: number, qx: number, qy: number, best: number): number {
  const sx = qx - px;
  const sy = qy - py;
  const denom = rx * sy - ry * sx;
  if (denom === 0) return best;
  const wx = px - ox;
  const wy = py - oy;
  const t = (wx * sy - wy * sx) / denom;
  if (t < 0 || t >= best) return best;
  const u = (wx * ry - wy * rx) / denom;
  return u >= 0 && u <= 1 ? t : best;
}
