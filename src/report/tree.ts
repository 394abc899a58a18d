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
    else children.set(v.parent, [...(children.get(v.parent) ?? []), v.id]);
  }
  const placed = new Map<number, { depth: number; slot: number }>();
  let next = 0;
  const visit = (id: number, depth: number): number => {
    const kids = children.get(id) ?? [];
    if (kids.length === 0) {
      placed.set(id, { depth, slot: next++ });
      return placed.get(id)!.slot;
    }
    const slots = kids.map((k) => visit(k, depth + 1));
    const slot = (slots[0] + slots[slots.length - 1]) / 2;
    placed.set(id, { depth, slot });
    return slot;
  };
  for (const r of roots) visit(r, 0);
  const parentOf = new Map(nodes.map((v) => [v.id, v.parent]));
  return nodes.map((v) => {
    const p = placed.get(v.id)!;
    return { id: v.id, parent: parentOf.get(v.id) ?? null, depth: p.depth, x: gap / 2 + p.slot * gap, y: 20 + p.depth * levelGap };
  });
}
