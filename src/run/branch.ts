import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import type { BranchSource, Recipe } from '../coevo/index.js';
import { canonicalJson, UserError } from '../core/index.js';
import type { PolicyShape } from '../policy/index.js';
import { clipGenome, validateGenome, type TerrainFamily } from '../terrain/index.js';
import { parseSourceSpec, sourceCache, sourceCourse, type Source } from './sources.js';

/** Top-level fields of two plans that differ, e.g. "joints, rays". */
function planDifferences(a: BodyPlan, b: BodyPlan): string[] {
  const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])];
  return keys.filter((k) => canonicalJson((a as unknown as Record<string, unknown>)[k]) !== canonicalJson((b as unknown as Record<string, unknown>)[k]));
}

function describeShape(s: PolicyShape): string {
  return `${s.inputs} inputs, hidden [${s.hidden.join(', ')}], ${s.outputs} outputs, ${s.activation}`;
}

/** Refuses a source whose body plan or network shape is not the new run's. */
function assertFits(spec: string, src: Source, plan: BodyPlan, shape: PolicyShape): void {
  const differs = planDifferences(src.plan, plan);
  if (differs.length > 0) {
    throw new UserError(`Branch source ${spec}: its body plan "${src.plan.name}" differs from the recipe's "${plan.name}" in ${differs.join(', ')}; a branch keeps the body plan`);
  }
  if (canonicalJson(src.shape) !== canonicalJson(shape)) {
    throw new UserError(`Branch source ${spec}: its walkers' network (${describeShape(src.shape)}) differs from the recipe's (${describeShape(shape)}); set policy.hidden and policy.activation to match`);
  }
}

/**
 * Reads a recipe's `from` specs (`RUN_OR_EXPORT:COURSE_ID`) into branch sources: the course's
 * genome and its walker's exact weights, with the source's fingerprint. Refuses, naming what
 * differs, a body plan or network shape other than the recipe's, and a genome outside the
 * recipe's family (unless `clip`, which clamps it into the family's bounds; a feature kind the
 * family does not allow is refused even then).
 */
export function resolveSources(recipe: Recipe, family: TerrainFamily, plan: BodyPlan, clip: boolean): BranchSource[] {
  if (recipe.from.length > recipe.population.maxActive) {
    throw new UserError(`Branch sources: ${recipe.from.length} given, but population.maxActive is ${recipe.population.maxActive}; give at most that many or raise it`);
  }
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: recipe.policy.hidden, outputs: actionSize(plan), activation: recipe.policy.activation };
  const open = sourceCache();
  const seen = new Set<string>();
  return recipe.from.map((spec): BranchSource => {
    const { path, courseId } = parseSourceSpec(spec);
    const src = open(path);
    const c = sourceCourse(src, courseId);
    const key = `${src.fingerprint}:${courseId}`;
    if (seen.has(key)) throw new UserError(`Branch source ${spec} is given twice`);
    seen.add(key);
    assertFits(spec, src, plan, shape);
    let genome = c.genome;
    const problems = validateGenome(genome, family);
    if (problems.length > 0) {
      const clipped = clipGenome(genome, family);
      if (!clip || clipped.refused.length > 0) {
        const why = clip ? clipped.refused : problems;
        throw new UserError(`Branch source ${spec}: course ${courseId} (family "${src.family.name}") does not fit the recipe's family "${family.name}"${clip ? '' : ' (pass --clip to clamp it into the family\'s bounds)'}:`, why);
      }
      const left = validateGenome(clipped.genome, family);
      if (left.length > 0) throw new UserError(`Branch source ${spec}: course ${courseId} still does not fit family "${family.name}" after clipping:`, left);
      genome = clipped.genome;
    }
    return { fingerprint: src.fingerprint, courseId, genome, clipped: genome !== c.genome, walkerId: c.holder.walkerId, params: c.holder.params };
  });
}
