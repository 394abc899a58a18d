import type { Walker } from './walker.js';

const DEG = Math.PI / 180;

/**
 * Drives every joint motor from controller outputs a ∈ [−1, 1] (values outside are clamped):
 * - target-angle: target = lower + (a + 1)/2 · (upper − lower); motor speed = gain · (target − angle),
 *   limited to ±maxSpeed; torque up to maxTorque;
 * - speed: motor speed = a · maxSpeed, torque up to maxTorque;
 * - torque: the motor pushes towards sign(a) · maxSpeed with at most |a| · maxTorque.
 */
export function applyActions(walker: Walker, actions: ArrayLike<number>): void {
  const defs = walker.plan.joints;
  const mode = walker.plan.action;
  for (let j = 0; j < defs.length; j++) {
    const d = defs[j];
    const joint = walker.joints[j];
    const a = actions[j] > 1 ? 1 : actions[j] < -1 ? -1 : actions[j] || 0;
    if (mode === 'target-angle') {
      const target = (d.lower + ((a + 1) / 2) * (d.upper - d.lower)) * DEG;
      const speed = d.gain * (target - joint.getJointAngle());
      joint.setMotorSpeed(speed > d.maxSpeed ? d.maxSpeed : speed < -d.maxSpeed ? -d.maxSpeed : speed);
    } else if (mode === 'speed') {
      joint.setMotorSpeed(a * d.maxSpeed);
    } else {
      joint.setMotorSpeed(a >= 0 ? d.maxSpeed : -d.maxSpeed);
      joint.setMaxMotorTorque(Math.abs(a) * d.maxTorque);
    }
  }
}
