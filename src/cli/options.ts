import { InvalidArgumentError } from 'commander';

/** Commander parser for an integer option within [min, max]. */
export function intIn(min: number, max: number): (v: string) => number {
  return (v: string) => {
    const n = Number(v);
    if (!/^[+-]?\d+$/.test(v.trim()) || !Number.isSafeInteger(n)) throw new InvalidArgumentError(`expected an integer, found "${v}"`);
    if (n < min || n > max) throw new InvalidArgumentError(`expected an integer in [${min}, ${max}], found ${n}`);
    return n;
  };
}

/** Commander parser for an even integer option within [min, max] (an ES population: mirrored pairs). */
export function evenIn(min: number, max: number): (v: string) => number {
  const int = intIn(min, max);
  return (v: string) => {
    const n = int(v);
    if (n % 2 !== 0) throw new InvalidArgumentError(`expected an even number (candidates come in mirrored pairs), found ${n}`);
    return n;
  };
}

/** Commander parser for a number option within [min, max]. */
export function numberIn(min: number, max: number): (v: string) => number {
  return (v: string) => {
    const n = Number(v);
    if (v.trim() === '' || !Number.isFinite(n)) throw new InvalidArgumentError(`expected a number, found "${v}"`);
    if (n < min || n > max) throw new InvalidArgumentError(`expected a number in [${min}, ${max}], found ${n}`);
    return n;
  };
}

/** Commander parser for a comma-separated list of layer sizes, e.g. "32,32"; "" or "none" is a linear policy. */
export function hiddenSizes(v: string): number[] {
  if (v.trim() === '' || v.trim() === 'none') return [];
  return v.split(',').map((p) => intIn(1, 1024)(p.trim()));
}

/** Commander parser for one of a fixed set of words. */
export function oneOf<T extends string>(words: readonly T[]): (v: string) => T {
  return (v: string) => {
    if (!words.includes(v as T)) throw new InvalidArgumentError(`expected one of ${words.join(', ')}, found "${v}"`);
    return v as T;
  };
}

/** Commander parser for a list of seeds: "1-5", "1,4,9" or a mix ("1-3,7"); at most 1000, no repeats. */
export function seedList(v: string): number[] {
  const seeds = v.split(',').flatMap((part) => {
    const m = /^\s*(\d+)\s*-\s*(\d+)\s*$/.exec(part);
    if (!m) return [intIn(0, 2 ** 31 - 1)(part.trim())];
    const [a, b] = [intIn(0, 2 ** 31 - 1)(m[1]), intIn(0, 2 ** 31 - 1)(m[2])];
    if (b < a || b - a >= 1000) throw new InvalidArgumentError(`expected a range low-high with low ≤ high and at most 1000 seeds, found "${part.trim()}"`);
    return Array.from({ length: b - a + 1 }, (_, i) => a + i);
  });
  if (new Set(seeds).size !== seeds.length) throw new InvalidArgumentError(`expected each seed once, found "${v}"`);
  if (seeds.length > 1000) throw new InvalidArgumentError('expected at most 1000 seeds');
  return seeds;
}
