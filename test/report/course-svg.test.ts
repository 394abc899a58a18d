/**
 * The standalone course picture: a well-formed SVG document with the ground, the obstacles
 * and one group of walker parts per pose it picks from the replay.
 */
import fc from 'fast-check';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadBodyPlan } from '../../src/body/index.js';
import { courseBounds, strobeSvg } from '../../src/report/index.js';
import { buildCourse, loadFamily, type Course } from '../../src/terrain/index.js';
import { ROOT, xmlProblems } from './helpers.js';

const plan = loadBodyPlan(join(ROOT, 'envs/bodies/trestle.json'));
const family = loadFamily(join(ROOT, 'envs/terrain/starter.json'));

/** A hand-made course: flat, a step up, one block standing on the upper level. */
const handMade: Course = {
  ground: [-5, 0, 6, 0, 6, 0.5, 30, 0.5],
  obstacles: [[10, 0.5, 11, 0.5, 11, 1.2, 10, 1.2]],
  friction: 0.8, startX: 0, finishX: 25, spawnGroundY: 0,
};

/** `count` frames, each [x, y, angle] per segment, the walker moving right. */
function frames(count: number): number[][] {
  return Array.from({ length: count }, (_, k) => plan.segments.flatMap((_, i) => [0.1 * k + 0.05 * i, 1 + 0.01 * i, 0.02 * k]));
}

/** Indices of frames a strobe with `every` should draw: every `every`-th and the last one. */
function expectedPicks(count: number, every: number): number[] {
  return Array.from({ length: count }, (_, i) => i).filter((i) => i % every === 0 || i === count - 1);
}

const poseGroups = (svg: string) => [...svg.matchAll(/<g opacity="([^"]+)">(.*?)<\/g>/g)].map((m) => ({ opacity: Number(m[1]), body: m[2] }));

describe('strobeSvg', () => {
  it('writes a well-formed SVG document, escaping the title', () => {
    const svg = strobeSvg(handMade, plan.segments, frames(30), 'course 3 <hard> & "steep"', 10);
    expect(xmlProblems(svg)).toEqual([]);
    expect(svg).toMatch(/^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
    expect(svg).toContain('<title>course 3 &lt;hard&gt; &amp; &quot;steep&quot;</title>');
  });

  it('draws the ground as one closed band and each obstacle as a polygon', () => {
    const svg = strobeSvg(handMade, plan.segments, frames(5), 't');
    const ground = [...svg.matchAll(/<polygon class="ground" points="([^"]*)"/g)];
    expect(ground).toHaveLength(1);
    // Every ground vertex, then two corners down at the bottom of the picture.
    const pts = ground[0][1].split(' ').map((p) => p.split(',').map(Number));
    expect(pts).toHaveLength(handMade.ground.length / 2 + 2);
    expect(pts.slice(0, 4)).toEqual([[-5, 0], [6, 0], [6, 0.5], [30, 0.5]]);
    const floor = courseBounds(handMade).y0;
    expect(pts.slice(4).map((p) => p[1])).toEqual([floor, floor]);
    expect(floor).toBeLessThan(0);
    expect(svg.match(/<polygon class="obstacle"/g)).toHaveLength(1);
  });

  it('draws one group per picked pose, each with every segment, later poses more opaque', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 60 }), fc.integer({ min: 1, max: 15 }), (count, every) => {
      const fs = frames(count);
      const svg = strobeSvg(buildCourse(family.start, family), plan.segments, fs, 'p', every);
      expect(svg).not.toMatch(/Infinity|NaN/);
      const groups = poseGroups(svg);
      const picks = expectedPicks(count, every);
      expect(groups).toHaveLength(picks.length);
      groups.forEach((g, k) => {
        const shapes = [...g.body.matchAll(/<(rect|circle) class="(\w+)"[^>]*transform="translate\(([^ ]+) ([^)]+)\)/g)];
        expect(shapes.map((s) => s[2])).toEqual(plan.segments.map((s, i) => (i === 0 ? 'torso' : s.foot ? 'foot' : 'limb')));
        // The torso of group k stands where the torso was in the k-th picked frame.
        expect(Number(shapes[0][3])).toBeCloseTo(fs[picks[k]][0], 3);
        expect(Number(shapes[0][4])).toBeCloseTo(fs[picks[k]][1], 3);
        if (k > 0) expect(g.opacity).toBeGreaterThan(groups[k - 1].opacity);
      });
      if (groups.length > 0) expect(groups[groups.length - 1].opacity).toBeCloseTo(0.9, 6);
    }), { numRuns: 60 });
  });

  it('frames a flat course whose ground has no vertex between start and finish', () => {
    // The starting course of a family is like this: a wall at the back, then one long segment.
    const flat: Course = { ground: [-3, 3, -3, 0, 40, 0], obstacles: [], friction: 0.9, startX: 2, finishX: 30, spawnGroundY: 0 };
    const b = courseBounds(flat);
    expect([b.x0, b.x1, b.y0, b.y1].every(Number.isFinite)).toBe(true);
    expect(b.y0).toBeLessThan(0);
    expect(b.y1).toBeGreaterThan(0);
    const svg = strobeSvg(flat, plan.segments, frames(3), 't');
    expect(svg).not.toMatch(/Infinity|NaN/);
    expect(xmlProblems(svg)).toEqual([]);
  });

  it('frames the course from before the start to past the finish', () => {
    const b = courseBounds(handMade);
    expect(b.x0).toBeLessThanOrEqual(handMade.startX);
    expect(b.x1).toBeGreaterThanOrEqual(handMade.finishX);
    expect(b.y1).toBeGreaterThan(1.2); // above the block's top
    const svg = strobeSvg(handMade, plan.segments, [], 't');
    const [, w, h] = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg)!.map(Number);
    expect(w).toBeCloseTo((b.x1 - b.x0) * 40, 1);
    expect(h).toBeCloseTo((b.y1 - b.y0) * 40, 1);
  });
});
