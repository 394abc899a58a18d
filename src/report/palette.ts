/** The report's colours: warm paper, ink, moss for active, slate for archived, terracotta for solved. */
export const C = { paper: '#f4efe4', ink: '#2b2823', moss: '#5b7f4a', slate: '#8a8f98', clay: '#b2472b', ochre: '#c98a2b', blue: '#2f6f8f', plum: '#7a4f8f', teal: '#3d8f84' };

/**
 * A colour per feature kind, by the kind's place in registration order (gap, step, block,
 * slope, then repeating), and grey for 'none' (courses without features).
 */
const KIND_COLOURS = [C.blue, C.ochre, C.plum, C.teal, C.moss, C.clay];

export function kindColour(kind: string, kinds: readonly string[]): string {
  const i = kinds.indexOf(kind);
  return i < 0 ? C.slate : KIND_COLOURS[i % KIND_COLOURS.length];
}

function hex(c: string): number[] {
  return [1, 3, 5].map((i) => parseInt(c.slice(i, i + 2), 16));
}

/** The colour a fraction `t` in [0, 1] of the way from `a` to `b` (#rrggbb), mixed in sRGB. */
export function mix(a: string, b: string, t: number): string {
  const [p, q] = [hex(a), hex(b)];
  const u = Math.min(1, Math.max(0, t));
  return `#${p.map((v, i) => Math.round(v + (q[i] - v) * u).toString(16).padStart(2, '0')).join('')}`;
}

/** Ends of the difficulty scale of the coverage map: pale sand for the easiest, deep red for the hardest. */
export const EASY = '#efdca6';
export const HARD = '#7d1a08';
