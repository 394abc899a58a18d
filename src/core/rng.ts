import seedrandom from 'seedrandom';

/**
 * Serialisable state of a random stream (the Alea generator's four numbers).
 * Plain data: it goes into run state and checkpoints as is.
 */
export interface StreamState {
  readonly c: number;
  readonly s0: number;
  readonly s1: number;
  readonly s2: number;
}

/** A seeded random stream. Every random draw in cairn comes from one of these. */
export interface Stream {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal N(0, 1) by the Box–Muller transform (two uniforms per draw, no cache). */
  normal(): number;
  /** Uniform integer in [0, n). */
  int(n: number): number;
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number;
  /** A 32-bit unsigned integer, e.g. a seed for a sub-stream. */
  uint32(): number;
  /** Snapshot of the generator, from which `restoreStream` rebuilds it exactly. */
  state(): StreamState;
}

type AleaPrng = seedrandom.PRNG & { state(): StreamState };

function wrap(prng: AleaPrng): Stream {
  const next = (): number => prng();
  return {
    next,
    normal(): number {
      // 1 - u keeps the logarithm's argument in (0, 1].
      const u1 = 1 - next();
      const u2 = next();
      return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    },
    int(n: number): number {
      return Math.floor(next() * n);
    },
    uniform(lo: number, hi: number): number {
      return lo + (hi - lo) * next();
    },
    uint32(): number {
      return prng.int32() >>> 0;
    },
    state(): StreamState {
      const s = prng.state();
      return { c: s.c, s0: s.s0, s1: s.s1, s2: s.s2 };
    },
  };
}

/**
 * The stream for `label` under run seed `seed`, e.g. `stream(7, 'iteration/12/pair/4/mutation')`.
 * Streams with different labels are independent, so adding a feature never shifts another's draws.
 */
export function stream(seed: number | string, label: string): Stream {
  return wrap(seedrandom.alea(`${seed}|${label}`, { state: true }) as AleaPrng);
}

/** Rebuilds a stream exactly from a saved state. */
export function restoreStream(state: StreamState): Stream {
  return wrap(seedrandom.alea('', { state: { ...state } }) as AleaPrng);
}

/**
 * A cheap, pure hash of integers to [0, 1) (mulberry32 finaliser on a combined key).
 * Used where a value must depend on its inputs alone (e.g. the roughness of a course),
 * not on a stream's position.
 */
export function hash01(a: number, b: number): number {
  let t = (Math.imul(a | 0, 0x9e3779b1) ^ Math.imul((b | 0) + 0x6d2b79f5, 0x85ebca77)) >>> 0;
  t = Math.imul(t ^ (t >>> 15), t | 1);
  t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
}
