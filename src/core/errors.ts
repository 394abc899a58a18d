/**
 * Bad input from the user: a recipe, genome, body plan, flag or file that cannot be used.
 * Library code throws only this for bad input; `src/cli/` turns it into one message and exit code 2.
 */
export class UserError extends Error {
  /** Every individual problem, each starting with its location (file and field path). */
  readonly problems: readonly string[];

  constructor(message: string, problems: readonly string[] = []) {
    super(problems.length > 0 ? `${message}\n${problems.map((p) => `  - ${p}`).join('\n')}` : message);
    this.name = 'UserError';
    this.problems = problems;
  }
}

/** Throws a UserError listing `problems` when there are any. */
export function assertNoProblems(what: string, problems: readonly string[]): void {
  if (problems.length > 0) {
    throw new UserError(`${what} is not valid (${problems.length} problem${problems.length === 1 ? '' : 's'}):`, problems);
  }
}
