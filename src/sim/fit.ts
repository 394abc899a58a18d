import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import { UserError } from '../core/index.js';
import type { PolicyShape } from '../policy/index.js';

/** Why a network cannot drive a body plan (its sizes against the plan's sensors and motors), or null when it fits. */
export function policyMisfit(shape: PolicyShape, plan: BodyPlan): string | null {
  const [inputs, outputs] = [observationSize(plan), actionSize(plan)];
  if (shape.inputs === inputs && shape.outputs === outputs) return null;
  return `its network takes ${shape.inputs} inputs and gives ${shape.outputs} outputs; body plan "${plan.name}" has ${inputs} sensors and ${outputs} motors`;
}

/** Refuses a network whose input and output sizes do not match the body plan's sensors and motors. */
export function assertPolicyFits(shape: PolicyShape, plan: BodyPlan, where: string): void {
  const why = policyMisfit(shape, plan);
  if (why) throw new UserError(`Walker ${where}: ${why}`);
}
