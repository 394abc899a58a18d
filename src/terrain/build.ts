import { hash01 } from '../core/index.js';
import { KINDS, type CourseBuilder } from './kinds/index.js';
import type { Course, TerrainFamily, TerrainGenome } from './types.js';

/** Ground before the origin, m, ending in a wall so walkers cannot leave backwards. */
const BACK = 3;
/** Height of that wall, m. */
const WALL = 3;
/** Flat run-out past the finish line, m, so a walker crossing it does not fall off the world. */
const RUN_OUT = 10;
/**
 * Shortest ground edge, m. Box2D-family engines expect chain vertices further apart than their
 * linear slop (0.005 m); a closer point replaces the previous one instead (or is dropped
 * when it sits at the same x).
 */
export const MIN_EDGE = 0.01;

function makeBuilder(genome: TerrainGenome, family: TerrainFamily, ground: number[], obstacles: number[][]): CourseBuilder {
  const { amplitude, seed } = genome.roughness;
  const spacing = family.roughnessSpacing;
  const point = (x: number, y: number): void => {
    const n = ground.length;
    if (n >= 2 && Math.hypot(ground[n - 2] - x, ground[n - 1] - y) < MIN_EDGE) {
      // A point straight above or below the last (a step under MIN_EDGE) is dropped, so the
      // following stretch absorbs it: replacing would tilt the ground before the feature,
      // as far back as the start zone.
      if (n >= 4 && ground[n - 2] !== x) {
        ground[n - 2] = x;
        ground[n - 1] = y;
      }
      return;
    }
    ground.push(x, y);
  };
  return {
    gapDepth: family.gapDepth,
    point,
    stretch(x1, y1) {
      let x0 = ground[ground.length - 2];
      let y0 = ground[ground.length - 1];
      if (amplitude > 0 && x1 > x0) {
        // The start zone stays flat (the spawn stands at height 0): a point at its edge, bumps only past it.
        if (x0 < family.startZone && x1 > family.startZone) {
          y0 += ((y1 - y0) * (family.startZone - x0)) / (x1 - x0);
          x0 = family.startZone;
          point(x0, y0);
        }
        // Bumps sit on a fixed grid (k · spacing) so a feature moving does not reshuffle them.
        const first = Math.max(Math.floor(x0 / spacing), Math.floor(family.startZone / spacing)) + 1;
        for (let k = first; k * spacing < x1 - MIN_EDGE; k++) {
          const x = k * spacing;
          if (x < x0 + MIN_EDGE) continue;
          const base = y0 + ((y1 - y0) * (x - x0)) / (x1 - x0);
          point(x, base + amplitude * (2 * hash01(seed, k) - 1));
        }
      }
      point(x1, y1);
    },
    obstacle(poly) {
      obstacles.push(poly);
    },
  };
}

/**
 * The course geometry of `genome` under `family`: a pure function of both.
 * The ground starts with a wall at x = −3 m, is flat at height 0 through the start zone,
 * lays out each feature in order, and runs 10 m flat past the finish line.
 */
export function buildCourse(genome: TerrainGenome, family: TerrainFamily): Course {
  const ground: number[] = [];
  const obstacles: number[][] = [];
  const b = makeBuilder(genome, family, ground, obstacles);
  b.point(-BACK, WALL);
  b.point(-BACK, 0);
  let level = 0;
  for (const f of genome.features) {
    b.stretch(f.x, level);
    level = KINDS[f.kind].build(f, level, b);
  }
  b.stretch(family.length + RUN_OUT, level);
  return {
    ground,
    obstacles,
    friction: family.friction,
    startX: family.spawnX,
    finishX: family.length,
    spawnGroundY: 0,
  };
}

/** Height of the ground polyline at `x` (the highest point where a vertical face sits at x). */
export function groundHeightAt(course: Course, x: number): number {
  const g = course.ground;
  let best = -Infinity;
  for (let i = 0; i + 3 < g.length; i += 2) {
    const x0 = g[i];
    const x1 = g[i + 2];
    if (x < x0 || x > x1) continue;
    const y = x1 === x0 ? Math.max(g[i + 1], g[i + 3]) : g[i + 1] + ((g[i + 3] - g[i + 1]) * (x - x0)) / (x1 - x0);
    best = Math.max(best, y);
  }
  return best;
}
