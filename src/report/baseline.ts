import { z } from 'zod';
import { parseWith, plural } from '../core/index.js';
import { esc } from './scale.js';

const progress = z.number().min(0).max(1);
const count = z.number().int().min(0);

/**
 * What the report reads of a run's baseline.json (written by `cairn baseline`). Tolerant:
 * fields it does not show may be added to the file; those it shows must have these types.
 */
const baselineSchema = z.looseObject({
  format: z.literal('cairn-baseline'),
  version: z.literal(1),
  settings: z.looseObject({
    top: count,
    seeds: z.array(z.number().int()),
    budget: z.union([z.literal('lineage'), count]),
  }),
  rows: z.array(z.looseObject({
    course: count,
    difficulty: z.number().min(0).max(1),
    coevolved: z.looseObject({ progress, crossedAt: count.nullable(), solvedAt: count.nullable(), confirmed: z.boolean() }),
    budget: count,
    direct: z.looseObject({
      seeds: z.array(z.looseObject({ seed: z.number().int(), progress })),
      median: progress,
      min: progress,
      max: progress,
      confirmed: count,
    }),
    verdict: z.enum(['co-evolved ahead', 'direct ahead', 'even']),
  })),
});

/** A run's direct baseline as the report shows it. */
export type Baseline = z.infer<typeof baselineSchema>;

/** Parses a baseline.json's contents; bad contents throw a UserError naming the file and each field. */
export function parseBaseline(json: unknown, where: string): Baseline {
  return parseWith(baselineSchema, json, where, 'Baseline');
}

/** The direct-baseline section: one row per course, and how often direct training was ahead. */
export function baselineSection(b: Baseline): string {
  const ahead = b.rows.filter((r) => r.verdict === 'direct ahead').length;
  const behind = b.rows.filter((r) => r.verdict === 'co-evolved ahead').length;
  const budget = b.settings.budget === 'lineage' ? "each course's lineage rollouts (what co-evolution spent to get there)" : `${b.settings.budget.toLocaleString('en-US')} rollouts a seed`;
  const head = '<tr><th>course</th><th>difficulty</th><th>co-evolved progress</th><th>confirmed</th><th>direct median</th><th>direct range</th><th>seeds confirmed</th><th>rollouts</th><th>verdict</th></tr>';
  const rows = b.rows.map((r) => [
    `<tr data-course="${r.course}" data-verdict="${esc(r.verdict)}">`,
    `<td>${r.course}</td><td>${r.difficulty.toFixed(3)}</td><td>${r.coevolved.progress.toFixed(3)}</td><td>${r.coevolved.confirmed ? 'yes' : 'no'}</td>`,
    `<td>${r.direct.median.toFixed(3)}</td><td>${r.direct.min.toFixed(3)}–${r.direct.max.toFixed(3)}</td><td>${r.direct.confirmed} of ${r.direct.seeds.length}</td>`,
    `<td>${r.budget.toLocaleString('en-US')}</td><td>${esc(r.verdict)}</td></tr>`,
  ].join(''));
  return `<section id="baseline"><h2>Direct baseline</h2>
<p>Fresh walkers trained by plain evolution strategies directly on the run's ${plural(b.rows.length, 'hardest course')}, seeds ${b.settings.seeds.join(', ')}, with a budget of ${esc(budget)}: the control that shows whether the stepping stones mattered.</p>
<p class="facts" id="baseline-summary">Direct training was ahead on ${ahead} of ${plural(b.rows.length, 'course')}; co-evolution was ahead on ${behind}; even on ${b.rows.length - ahead - behind}.</p>
<table id="baseline-table">${head}${rows.join('')}</table></section>`;
}
