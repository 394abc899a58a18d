/**
 * The perturbations live in the core layer because worker threads rebuild candidates from a
 * seed and workers import only core, sim, policy, terrain and body.
 */
export { NOISE_LABEL, perturbation, candidate } from '../core/index.js';
