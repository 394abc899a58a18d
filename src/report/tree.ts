/** A node of the course lineage. */
export interface TreeInput { readonly id: number; readonly parent: number | null }

export interface PlacedNode { readonly id: number; readonly parent: number | null; readonly depth: number; readonly x: number; readonly y: number }

/**
 * Lays out a forest top-down: depth is the number of ancestors, leaves take consecutive slots
 * left to right (children in id order), and each parent sits midway over its first and last
 * child. Slots are `gap` apart and levels `levelGap` apart, so no two nodes share a position
 * and nodes on one level are at least `gap` apart.
 */
export function layoutTree(nodes: readonly TreeInput[], gap = 28, levelGap = 46): PlacedNode[] {
  const ids = new Set(nodes.map((v) => v.id));
  const children = new Map<number, number[]>();
  const roots: number[] = [];
  for (const v of [...nodes].sort((a, b) => a.id - b.id)) {
    if (v.parent === null || !ids.has(v.parent)) roots.push(v.id);
    else {
      const list = children.get(v.parent);
      if (list) list.push(v.id);
      else children.set(v.parent, [v.id]);
    }
  }
  const placed = new Map<number, { depth: number; slot: number }>();
  let next = 0;
  // Depth first with an explicit stack, not recursion: a lineage can be thousands of
  // generations deep, more than the call stack holds. A node is placed once its children are.
  for (const r of roots) {
    const stack = [{ id: r, depth: 0, k: 0 }];
    while (stack.length > 0) {
      const top = stack[stack.length - 1];
      const kids = children.get(top.id) ?? [];
      if (top.k < kids.length) {
        stack.push({ id: kids[top.k++], depth: top.depth + 1, k: 0 });
        continue;
      }
      stack.pop();
      const slot = kids.length === 0 ? next++ : (placed.get(kids[0])!.slot + placed.get(kids[kids.length - 1])!.slot) / 2;
      placed.set(top.id, { depth: top.depth, slot });
    }
  }
  const parentOf = new Map(nodes.map((v) => [v.id, v.parent]));
  return nodes.map((v) => {
    const p = placed.get(v.id)!;
    return { id: v.id, parent: parentOf.get(v.id) ?? null, depth: p.depth, x: gap / 2 + p.slot * gap, y: 20 + p.depth * levelGap };
  });
}
