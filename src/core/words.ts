/** "1 course", "3 courses": a count with its noun in the right number. */
export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}
