import type { ReportCourse, ReportData } from './data.js';
import { C, kindColour } from './palette.js';
import { esc, n } from './scale.js';
import { layoutTree } from './tree.js';

/** Whether a course was solved, crossed (and not yet solved) or neither. */
export type Mark = 'solved' | 'crossed' | 'neither';

export function markOf(c: Pick<ReportCourse, 'solvedAt' | 'crossedAt'>): Mark {
  return c.solvedAt !== null ? 'solved' : c.crossedAt !== null ? 'crossed' : 'neither';
}

/** The node's shape, centred on 0,0: a circle for neither, a square for crossed, a diamond for solved. */
function shape(mark: Mark, fill: string): string {
  if (mark === 'solved') return `<polygon class="mark" points="0,-14 14,0 0,14 -14,0" fill="${fill}"/>`;
  if (mark === 'crossed') return `<rect class="mark" x="-10" y="-10" width="20" height="20" rx="2" fill="${fill}"/>`;
  return `<circle class="mark" r="11" fill="${fill}"/>`;
}

/** The lineage tree: a node per course, shaped by crossed / solved / neither and filled by its lineage's dominant kind. */
export function lineageSvg(d: ReportData): string {
  const placed = layoutTree(d.courses);
  const at = new Map(placed.map((p) => [p.id, p]));
  // A margin of 6 px all round: a diamond reaches 14 px from its centre, the layout leaves 14 at the edges.
  const w = Math.max(200, ...placed.map((p) => p.x + 26));
  const h = Math.max(80, ...placed.map((p) => p.y + 30));
  const edges = placed.filter((p) => p.parent !== null && at.has(p.parent)).map((p) => {
    const q = at.get(p.parent!)!;
    return `<path class="edge" d="M${n(q.x)},${n(q.y)} C${n(q.x)},${n((q.y + p.y) / 2)} ${n(p.x)},${n((q.y + p.y) / 2)} ${n(p.x)},${n(p.y)}"/>`;
  });
  const byId = new Map(d.courses.map((c) => [c.id, c]));
  const kindOf = new Map(d.lineages.map((l) => [l.id, l.kind]));
  const nodes = placed.map((p) => {
    const c = byId.get(p.id)!;
    const mark = markOf(c);
    const kind = kindOf.get(c.lineage) ?? 'none';
    const from = c.source ? `, branched from course ${c.source.courseId} of run ${c.source.fingerprint.slice(0, 12)}` : '';
    const when = [c.crossedAt !== null ? `crossed at ${c.crossedAt}` : 'not crossed', c.solvedAt !== null ? `solved at ${c.solvedAt}` : 'not solved'].join(', ');
    const tip = `course ${c.id}, admitted at ${c.admittedAt}, ${c.status}, ${when}; lineage ${c.lineage} (${kind})${from}`;
    return `<g class="node ${c.status} ${mark}" data-course="${c.id}" data-lineage="${c.lineage}" data-kind="${kind}" transform="translate(${n(p.x)} ${n(p.y)})"><title>${esc(tip)}</title>${shape(mark, kindColour(kind, d.kinds))}<text text-anchor="middle" y="3.5">${c.id}</text></g>`;
  });
  return `<svg id="lineage-svg" viewBox="0 0 ${n(w)} ${n(h)}" width="${n(w)}" height="${n(h)}"><g transform="translate(6 6)">${edges.join('')}${nodes.join('')}</g></svg>`;
}

const icon = (mark: Mark): string => `<svg class="icon" viewBox="-15 -15 30 30" width="16" height="16">${shape(mark, C.slate)}</svg>`;

/** The tree's legend: shapes, the faded look of archived courses, and each lineage's kind colour. */
export function lineageLegend(d: ReportData): string {
  const marks = `${icon('neither')} neither crossed nor solved ${icon('crossed')} crossed (not yet solved) ${icon('solved')} solved; faded, dashed outline: archived`;
  const lineages = d.lineages.map((l) => {
    const colour = kindColour(l.kind, d.kinds);
    return `<span class="lineage-key" data-lineage="${l.id}" data-kind="${l.kind}"><i style="background:${colour}"></i>${l.id}: ${l.kind}, ${l.alive ? `alive (${l.active} active)` : 'extinct'}</span>`;
  });
  return `<p class="facts" id="lineage-marks">${marks}</p><p class="facts" id="lineage-kinds">lineages by first course, coloured by dominant kind: ${lineages.join(' ')}</p>`;
}
