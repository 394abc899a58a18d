import { assertNoProblems } from '../core/index.js';

/**
 * Hyper-parameters of evolution strategies with mirrored sampling and an Adam update.
 * Plain data, fixed for a run (it lives in the recipe, not in the state).
 */
export interface EsConfig {
  /**
   * Candidates evaluated per iteration, an even integer ≥ 2: population/2 perturbations, each
   * tried with both signs (mirrored sampling).
   */
  readonly population: number;
  /** Perturbation scale σ, > 0, in parameter units (the noise is σ·ε with ε ~ N(0, I)). */
  readonly sigma: number;
  /** Adam step size α, > 0, in parameter units per iteration (roughly the largest change of one parameter). */
  readonly learningRate: number;
  /** Adam decay of the first-moment average β₁, in [0, 1). */
  readonly beta1: number;
  /** Adam decay of the second-moment average β₂, in [0, 1). */
  readonly beta2: number;
  /** Adam's ε, > 0, guarding the division by sqrt(v̂); dimensionless in gradient units. */
  readonly epsilon: number;
  /**
   * L2 coefficient λ ≥ 0 (per iteration, dimensionless): λ·mean is subtracted from the
   * estimated ascent direction before the Adam step, i.e. the objective is penalised by
   * (λ/2)·|mean|². Keeps weights small, so tanh units stay in their responsive range.
   */
  readonly weightDecay: number;
}

/**
 * Defaults: population 32 (16 mirrored perturbations), σ 0.05, Adam 0.02 with Kingma & Ba's suggested
 * β₁ 0.9, β₂ 0.999, ε 1e-8, and an L2 coefficient of 0.005 (the value recalled, from memory,
 * from Salimans et al. 2017's experiments). Population, σ and step size are the settings that
 * taught a four-legged walker on a flat course within tens of iterations in prototypes.
 */
export function defaultEsConfig(): EsConfig {
  return { population: 32, sigma: 0.05, learningRate: 0.02, beta1: 0.9, beta2: 0.999, epsilon: 1e-8, weightDecay: 0.005 };
}

const FIELDS: readonly (keyof EsConfig)[] = ['population', 'sigma', 'learningRate', 'beta1', 'beta2', 'epsilon', 'weightDecay'];

function fieldProblem(key: keyof EsConfig, x: unknown): string | null {
  if (typeof x !== 'number' || !Number.isFinite(x)) return 'expected a finite number';
  switch (key) {
    case 'population':
      return Number.isInteger(x) && x >= 2 && x % 2 === 0 ? null : 'expected an even integer ≥ 2 (candidates come in mirrored pairs)';
    case 'beta1':
    case 'beta2':
      return x >= 0 && x < 1 ? null : 'expected a number in [0, 1)';
    case 'weightDecay':
      return x >= 0 ? null : 'expected a number ≥ 0';
    default:
      return x > 0 ? null : 'expected a number > 0';
  }
}

/** Problems with an ES configuration, each prefixed with its path under `where`. Empty when valid. */
export function validateEsConfig(cfg: unknown, where: string): string[] {
  if (typeof cfg !== 'object' || cfg === null || Array.isArray(cfg)) {
    return [`${where}: expected an object of evolution-strategy settings, found ${JSON.stringify(cfg) ?? 'nothing'}`];
  }
  const c = cfg as Record<string, unknown>;
  const problems: string[] = [];
  for (const key of FIELDS) {
    const p = fieldProblem(key, c[key]);
    if (p !== null) problems.push(`${where}.${key}: ${p}, found ${JSON.stringify(c[key]) ?? 'nothing'}`);
  }
  for (const key of Object.keys(c).sort()) {
    if (!(FIELDS as readonly string[]).includes(key)) problems.push(`${where}.${key}: unknown field`);
  }
  return problems;
}

/**
 * An ES configuration from JSON: missing fields take {@link defaultEsConfig}'s values, then the
 * whole is validated; throws a UserError listing every problem.
 */
export function parseEsConfig(json: unknown, where: string): EsConfig {
  const base = typeof json === 'object' && json !== null && !Array.isArray(json) ? { ...defaultEsConfig(), ...json } : json;
  assertNoProblems(`evolution-strategy settings at ${where}`, validateEsConfig(base, where));
  return base as EsConfig;
}

/** Mirrored perturbations per iteration: each is tried as mean + σε and mean − σε. */
export function mirroredCount(config: EsConfig): number {
  return config.population / 2;
}
