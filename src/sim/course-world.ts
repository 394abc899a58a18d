import { Chain, Polygon, Vec2, type World } from 'planck-js';
import type { Course } from '../terrain/index.js';

/** Adds the course to `world` as one static body: the ground as a chain, each obstacle as a polygon. */
export function addCourse(world: World, course: Course): void {
  const ground = world.createBody();
  const g = course.ground;
  const points = [];
  for (let i = 0; i < g.length; i += 2) points.push(Vec2(g[i], g[i + 1]));
  ground.createFixture({ shape: Chain(points, false), friction: course.friction });
  for (const poly of course.obstacles) {
    const verts = [];
    for (let i = 0; i < poly.length; i += 2) verts.push(Vec2(poly[i], poly[i + 1]));
    ground.createFixture({ shape: Polygon(verts), friction: course.friction });
  }
}
