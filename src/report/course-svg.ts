import type { SegmentDef } from '../body/index.js';
import { groundHeightAt, type Course } from '../terrain/index.js';
import { esc, n } from './scale.js';

/** World-space bounds of what is drawn of a course: from just before the start to just past the finish. */
export function courseBounds(c: Course): { x0: number; x1: number; y0: number; y1: number } {
  const x0 = Math.min(-1, c.startX - 2);
  const x1 = c.finishX + 2;
  let y0 = Infinity;
  let y1 = -Infinity;
  for (let i = 0; i < c.ground.length; i += 2) {
    if (c.ground[i] < x0 || c.ground[i] > x1) continue;
    y0 = Math.min(y0, c.ground[i + 1]);
    y1 = Math.max(y1, c.ground[i + 1]);
  }
  // The ground at the window's edges too: a long straight segment (a flat course) may have
  // no vertex inside the window at all, which left the bounds infinite.
  for (const x of [x0, x1]) {
    const y = groundHeightAt(c, x);
    if (Number.isFinite(y)) [y0, y1] = [Math.min(y0, y), Math.max(y1, y)];
  }
  for (const p of c.obstacles) for (let i = 1; i < p.length; i += 2) y1 = Math.max(y1, p[i]);
  return { x0, x1, y0: y0 - 0.3, y1: y1 + 1.8 };
}

/** SVG elements (in world units, y up) for the ground as a filled band and the obstacles. */
export function courseShapes(c: Course, floor: number): string {
  const g = c.ground;
  const pts: string[] = [];
  for (let i = 0; i < g.length; i += 2) pts.push(`${n(g[i], 3)},${n(g[i + 1], 3)}`);
  pts.push(`${n(g[g.length - 2], 3)},${n(floor, 3)}`, `${n(g[0], 3)},${n(floor, 3)}`);
  const obstacles = c.obstacles.map((p) => `<polygon class="obstacle" points="${Array.from({ length: p.length / 2 }, (_, i) => `${n(p[2 * i], 3)},${n(p[2 * i + 1], 3)}`).join(' ')}"/>`);
  const lines = [
    `<line class="start-line" x1="${n(c.startX)}" x2="${n(c.startX)}" y1="${n(floor)}" y2="${n(c.spawnGroundY + 2.5)}"/>`,
    `<line class="finish-line" x1="${n(c.finishX)}" x2="${n(c.finishX)}" y1="${n(floor)}" y2="${n(c.spawnGroundY + 2.5)}"/>`,
  ];
  return `<polygon class="ground" points="${pts.join(' ')}"/>${obstacles.join('')}${lines.join('')}`;
}

/** One segment at pose (x, y, angle rad), drawn around its own centre. */
export function segmentShape(s: SegmentDef, x: number, y: number, angle: number, cls: string): string {
  const t = `translate(${n(x, 3)} ${n(y, 3)}) rotate(${n((angle * 180) / Math.PI, 2)})`;
  if (s.shape === 'circle') return `<circle class="${cls}" r="${s.radius}" transform="${t}"/>`;
  const [w, h] = s.size ?? [0, 0];
  return `<rect class="${cls}" x="${-w / 2}" y="${-h / 2}" width="${w}" height="${h}" transform="${t}"/>`;
}

/**
 * A standalone picture of a course with the walker's motion as a strobe of poses
 * (`frames[k]` = [x, y, angle] per segment), later poses darker.
 */
export function strobeSvg(c: Course, segments: readonly SegmentDef[], frames: readonly (readonly number[])[], title: string, every = 10): string {
  const b = courseBounds(c);
  const scale = 40;
  const w = (b.x1 - b.x0) * scale;
  const h = (b.y1 - b.y0) * scale;
  const poses: string[] = [];
  const picked = frames.filter((_, i) => i % every === 0 || i === frames.length - 1);
  picked.forEach((f, k) => {
    const o = 0.15 + (0.75 * (k + 1)) / picked.length;
    poses.push(`<g opacity="${n(o, 2)}">${segments.map((s, i) => segmentShape(s, f[3 * i], f[3 * i + 1], f[3 * i + 2], i === 0 ? 'torso' : s.foot ? 'foot' : 'limb')).join('')}</g>`);
  });
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${n(w)} ${n(h)}" width="${n(w)}" height="${n(h)}">`,
    `<title>${esc(title)}</title>`,
    `<style>${STROBE_STYLE}</style>`,
    `<rect width="100%" height="100%" fill="#f4efe4"/>`,
    `<g transform="scale(${scale} ${-scale}) translate(${n(-b.x0, 3)} ${n(-b.y1, 3)})">`,
    courseShapes(c, b.y0),
    poses.join(''),
    '</g></svg>',
  ].join('');
}

const STROBE_STYLE = [
  '.ground{fill:#cdbfa3;stroke:#6b5b45;stroke-width:0.03}',
  '.obstacle{fill:#9c8b73;stroke:#5a4a36;stroke-width:0.03}',
  '.start-line{stroke:#5b7f4a;stroke-width:0.04;stroke-dasharray:0.15 0.1}',
  '.finish-line{stroke:#b2472b;stroke-width:0.04;stroke-dasharray:0.15 0.1}',
  '.torso{fill:#2f4b5c;stroke:none}.limb{fill:#557a8c}.foot{fill:#d08a3c}',
].join('');
