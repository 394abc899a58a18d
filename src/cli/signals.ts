import { EXIT } from './fail.js';

/**
 * Graceful stops: the first SIGINT or SIGTERM asks the loop to stop after the current
 * iteration (which then checkpoints); a second SIGINT exits at once, leaving the last
 * checkpoint as it was.
 */
export function installStopHandlers(note: (s: string) => void): { requested: () => 'sigint' | 'sigterm' | null; remove: () => void } {
  let requested: 'sigint' | 'sigterm' | null = null;
  const onInt = (): void => {
    if (requested) process.exit(EXIT.sigint);
    requested = 'sigint';
    note('stopping after this iteration; press Ctrl-C again to quit at once (the last checkpoint stays valid)');
  };
  const onTerm = (): void => {
    requested ??= 'sigterm';
    note('SIGTERM: stopping after this iteration');
  };
  process.on('SIGINT', onInt);
  process.on('SIGTERM', onTerm);
  return {
    requested: () => requested,
    remove: () => {
      process.off('SIGINT', onInt);
      process.off('SIGTERM', onTerm);
    },
  };
}
