/**
 * The lineage layout: over random forests (each course's parent an earlier course, as
 * mutation makes them), nodes never overlap, levels follow ancestry and parents sit over
 * their children.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { layoutTree, type PlacedNode, type TreeInput } from '../../src/report/index.js';

/** A random forest of `ids` nodes: node 0 and some others are roots, the rest point to an earlier id. */
const forest = fc.integer({ min: 1, max: 60 }).chain((size) => fc.tuple(
  ...Array.from({ length: size }, (_, i) => (i === 0 ? fc.constant(null) : fc.option(fc.integer({ min: 0, max: i - 1 }), { freq: 6 }))),
)).map((parents): TreeInput[] => parents.map((parent, id) => ({ id, parent })));

/** Ids shuffled and spread out, so nothing relies on ids being 0..n-1 in input order. */
const shuffledForest = fc.tuple(forest, fc.integer({ min: 0, max: 1000 })).map(([nodes, salt]) => {
  const rename = (id: number) => 3 * id + 7;
  return nodes
    .map((v) => ({ id: rename(v.id), parent: v.parent === null ? null : rename(v.parent) }))
    .sort((a, b) => ((a.id * 7919 + salt) % 101) - ((b.id * 7919 + salt) % 101) || a.id - b.id);
});

const GAP = 28;
const LEVEL = 46;

function check(nodes: readonly TreeInput[], placed: readonly PlacedNode[]): void {
  expect(placed.map((p) => p.id)).toEqual(nodes.map((v) => v.id));
  const at = new Map(placed.map((p) => [p.id, p]));
  const positions = new Set(placed.map((p) => `${p.x},${p.y}`));
  expect(positions.size).toBe(placed.length);
  const byDepth = new Map<number, number[]>();
  for (const p of placed) byDepth.set(p.depth, [...(byDepth.get(p.depth) ?? []), p.x]);
  for (const xs of byDepth.values()) {
    xs.sort((a, b) => a - b);
    for (let i = 1; i < xs.length; i++) expect(xs[i] - xs[i - 1]).toBeGreaterThanOrEqual(GAP);
  }
  for (const p of placed) {
    const parent = p.parent === null ? undefined : at.get(p.parent);
    if (!parent) {
      expect(p.depth).toBe(0);
      continue;
    }
    expect(p.depth).toBe(parent.depth + 1);
    expect(p.y - parent.y).toBe(LEVEL);
  }
  for (const p of placed) {
    const kids = placed.filter((q) => q.parent === p.id).map((q) => q.x);
    if (kids.length === 0) continue;
    expect(p.x).toBeGreaterThanOrEqual(Math.min(...kids));
    expect(p.x).toBeLessThanOrEqual(Math.max(...kids));
    expect(p.x).toBe((Math.min(...kids) + Math.max(...kids)) / 2); // midway, as layoutTree documents
  }
  // Same depth means same height on the page.
  for (const p of placed) expect(p.y).toBe(placed.find((q) => q.depth === p.depth)!.y);
}

describe('layoutTree', () => {
  it('places random forests without overlaps, one level per generation, parents over their children', () => {
    fc.assert(fc.property(forest, (nodes) => check(nodes, layoutTree(nodes, GAP, LEVEL))), { numRuns: 120 });
  });

  it('does not depend on input order or on ids being consecutive', () => {
    fc.assert(fc.property(shuffledForest, (nodes) => check(nodes, layoutTree(nodes, GAP, LEVEL))), { numRuns: 60 });
  });

  it('treats a course whose parent is missing as a root, keeping the parent id', () => {
    const placed = layoutTree([{ id: 4, parent: 2 }, { id: 5, parent: 4 }], GAP, LEVEL);
    expect(placed.map((p) => [p.id, p.parent, p.depth])).toEqual([[4, 2, 0], [5, 4, 1]]);
  });

  it('centres a parent over its first and last child', () => {
    // 0 has children 1, 2, 3 (leaves in slots 0, 1, 2): it sits over the middle one.
    const placed = layoutTree([{ id: 0, parent: null }, { id: 1, parent: 0 }, { id: 2, parent: 0 }, { id: 3, parent: 0 }], GAP, LEVEL);
    expect(placed.map((p) => p.x)).toEqual([GAP / 2 + GAP, GAP / 2, GAP / 2 + GAP, GAP / 2 + 2 * GAP]);
  });

  it('lays out a lineage thousands of generations deep', () => {
    // A long unattended run can breed each course from the last one admitted.
    const chain: TreeInput[] = Array.from({ length: 20_000 }, (_, id) => ({ id, parent: id === 0 ? null : id - 1 }));
    const placed = layoutTree(chain, GAP, LEVEL);
    expect(placed.every((p, i) => p.depth === i && p.x === GAP / 2)).toBe(true);
  });
});
