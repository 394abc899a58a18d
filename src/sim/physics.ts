import { World, Vec2 } from 'planck-js';

/**
 * Physics settings of every world cairn builds. SI units throughout: metres, kilograms,
 * seconds, radians. Exported with every curriculum so another simulator can match them.
 */
export interface PhysicsSettings {
  /** Gravitational acceleration, m/s², pointing down (−y). Default 9.81. */
  readonly gravity: number;
  /** Fixed time step, s. Default 1/50. */
  readonly timeStep: number;
  /** Velocity-constraint solver iterations per step (integer ≥ 1). Default 20. */
  readonly velocityIterations: number;
  /** Position-constraint solver iterations per step (integer ≥ 1). Default 10. */
  readonly positionIterations: number;
}

/**
 * Defaults. 20/10 solver iterations rather than planck's 8/3: at 8/3 idle walkers drift and
 * policies learned there exploit solver slack.
 */
export function defaultPhysics(): PhysicsSettings {
  return { gravity: 9.81, timeStep: 1 / 50, velocityIterations: 20, positionIterations: 10 };
}

/** A fresh world with gravity along −y. */
export function makeWorld(settings: PhysicsSettings): World {
  return new World({ gravity: Vec2(0, -settings.gravity) });
}

/** Advances `world` by one fixed step with the configured solver iterations. */
export function stepWorld(world: World, settings: PhysicsSettings): void {
  world.step(settings.timeStep, settings.velocityIterations, settings.positionIterations);
}
