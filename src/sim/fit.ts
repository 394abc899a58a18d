import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import { UserError } from '../core/index.js';
import type { PolicyShape } from '../policy/index.js';

/** Refuses a network whose input and output sizes do not match the body plan's sensors and motors. */
export function assertPolicyFits(shape: PolicyShape, plan: BodyPlan, where: string): void {
  if (shape.inputs !== observationSize(plan) || shape.outputs !== actionSize(plan)) {
    throw new UserError(
      `Walker ${where}: network takes ${shape.inputs} inputs and gives ${shape.outputs} outputs; ` +
        `body plan "${plan.name}" needs ${observationSize(plan)} and ${actionSize(plan)}`,
    );
  }
}
