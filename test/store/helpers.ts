/**
 * Shared pieces of the run-directory tests: building dist/ for the command line, a tiny recipe
 * derived from runs/smoke.json, temporary folders, and running `cairn` as a child process.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { initialState, makeContext, type RunState, type StepOutcome } from '../../src/coevo/index.js';
import { InlineEvaluator } from '../../src/pool/index.js';
import { createRunDir, writeCheckpoint, type RunInputs } from '../../src/store/index.js';
import { loop, Run } from '../../src/run/index.js';

/**
 * Time limit of a test that runs the command line several times, ms. Far above the tens of
 * seconds such a test takes on a shared, loaded CPU: it only stops a broken run from hanging.
 */
export const SLOW = 300_000;

export { ROOT, CLI } from '../build.js';
import { ROOT, CLI } from '../build.js';

export { ensureBuilt } from '../build.js';

/** A fresh folder under the system temp directory. */
export function tempDir(label: string): string {
  return mkdtempSync(join(tmpdir(), `cairn-store-${label}-`));
}

type Sections = Record<string, Record<string, unknown>>;

/**
 * Writes a recipe derived from runs/smoke.json into `dir` and returns its path: ES population 8,
 * 200-step episodes, 6 iterations, admission every 2 and transfer every 3 iterations with a
 * band wide enough that courses are admitted, retired and taken over within those 6 (so the
 * state and the event log carry more than one kind of record). `changes` replaces fields per section.
 */
export function writeTinyRecipe(dir: string, changes: Sections = {}, file = 'tiny.json'): string {
  const smoke = JSON.parse(readFileSync(join(ROOT, 'runs/smoke.json'), 'utf8')) as Record<string, unknown> & Sections;
  const base: Sections = {
    es: { ...smoke.es, population: 8 },
    episode: { ...smoke.episode, maxSteps: 200 },
    admission: { ...smoke.admission, interval: 2, reproduceAbove: 0, candidates: 4, low: 0 },
    transfer: { ...smoke.transfer, interval: 3 },
    checkpoint: { ...smoke.checkpoint, interval: 2, keep: 3 },
    budget: { iterations: 6 },
  };
  for (const [k, v] of Object.entries(changes)) base[k] = { ...base[k], ...v };
  const recipe = {
    ...smoke, ...base, name: 'tiny',
    terrain: join(ROOT, 'runs', smoke.terrain as unknown as string),
    body: join(ROOT, 'runs', smoke.body as unknown as string),
  };
  const path = join(dir, file);
  writeFileSync(path, `${JSON.stringify(recipe, null, 2)}\n`);
  return path;
}

export interface CliResult {
  readonly code: number | null;
  readonly signal: NodeJS.Signals | null;
  readonly stdout: string;
  readonly stderr: string;
}

export interface Started {
  readonly child: ChildProcess;
  readonly done: Promise<CliResult>;
  /** Output so far. */
  out(): { stdout: string; stderr: string };
}

/** Starts `cairn <args>`; NO_COLOR keeps notes free of escape codes. */
export function startCli(args: readonly string[], cwd = ROOT): Started {
  const env: NodeJS.ProcessEnv = { ...process.env, NO_COLOR: '1' };
  delete env.NODE_OPTIONS;
  const child = spawn(process.execPath, [CLI, ...args], { cwd, env, stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  child.stdout!.setEncoding('utf8').on('data', (s: string) => { stdout += s; });
  child.stderr!.setEncoding('utf8').on('data', (s: string) => { stderr += s; });
  const done = new Promise<CliResult>((resolve, reject) => {
    child.once('error', reject);
    child.once('close', (code, signal) => resolve({ code, signal, stdout, stderr }));
  });
  return { child, done, out: () => ({ stdout, stderr }) };
}

/** Runs `cairn <args>` to the end. */
export function cli(args: readonly string[], cwd = ROOT): Promise<CliResult> {
  return startCli(args, cwd).done;
}

/** Runs `cairn <args>` and fails with its stderr unless it exits 0. */
export async function cliOk(args: readonly string[], cwd = ROOT): Promise<CliResult> {
  const r = await cli(args, cwd);
  if (r.code !== 0) throw new Error(`cairn ${args.join(' ')} exited ${r.code ?? r.signal}:\n${r.stderr}`);
  return r;
}

export interface StatusJson { iteration: number; fingerprint: string; skippedCheckpoints: number; targetIterations: number }

/** `cairn status <dir> --json`. */
export async function status(dir: string): Promise<StatusJson> {
  return JSON.parse((await cliOk(['status', dir, '--json'])).stdout) as StatusJson;
}

/** What must match between two runs that ought to be the same: fingerprint and both logs, byte for byte. */
export async function outcome(dir: string): Promise<{ iteration: number; fingerprint: string; metrics: string; events: string }> {
  const s = await status(dir);
  return {
    iteration: s.iteration,
    fingerprint: s.fingerprint,
    metrics: readFileSync(join(dir, 'metrics.jsonl'), 'utf8'),
    events: readFileSync(join(dir, 'events.jsonl'), 'utf8'),
  };
}

export const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/**
 * Polls `ready` until it holds. The limit only keeps a broken run from hanging the suite; it is
 * far above what any step takes on a loaded machine and is not a timing check.
 */
export async function waitFor(what: string, ready: () => boolean, limitMs = 120_000): Promise<void> {
  const t0 = Date.now();
  while (!ready()) {
    if (Date.now() - t0 > limitMs) throw new Error(`gave up waiting for ${what}`);
    await sleep(25);
  }
}

/** Lines in a file (0 when absent). */
export function lineCount(path: string): number {
  return existsSync(path) ? readFileSync(path, 'utf8').split('\n').filter((l) => l !== '').length : 0;
}

/** Files whose names start with the temp prefix, in the run directory and its checkpoints. */
export function tempFiles(dir: string): string[] {
  return [dir, join(dir, 'checkpoints')].flatMap((d) => (existsSync(d) ? readdirSync(d).filter((n) => n.startsWith('.tmp-')) : []));
}

/** A run directory made in this process from a tiny recipe, with its iteration-0 checkpoint. */
export function makeRun(root: string, changes: Sections = {}, name = 'run'): { inputs: RunInputs; state: RunState } {
  const recipe = writeTinyRecipe(root, changes, `${name}.json`);
  const inputs = createRunDir(recipe, join(root, name), {});
  const state = initialState(makeContext(inputs.recipe, inputs.family, inputs.plan));
  writeCheckpoint(inputs.dir, state, inputs.recipeHash, inputs.recipe.checkpoint.keep);
  return { inputs, state };
}

/** Drives a run in this process (no threads) to `target`, returning every outcome on the way. */
export async function advance(inputs: RunInputs, start: RunState, target: number): Promise<{ state: RunState; outcomes: StepOutcome[] }> {
  const outcomes: StepOutcome[] = [];
  const { state } = await loop(Run.of(inputs), start, {
    evaluator: new InlineEvaluator(), targetIterations: target, minutes: 0, stopRequested: () => null, onIteration: (o) => outcomes.push(o),
  });
  return { state, outcomes };
}

/** Flips the lowest bit of one digit inside a checkpoint's saved state (a digit stays a digit, so the JSON still parses). */
export function flipDigitInState(path: string): void {
  const bytes = readFileSync(path);
  let i = bytes.indexOf('"state":') + 100;
  while (bytes[i] < 0x30 || bytes[i] > 0x39) i++;
  bytes[i] ^= 1;
  writeFileSync(path, bytes);
}

/** The pid of a process that has already exited (Linux hands out pids in increasing order, so it is not reused soon). */
export function deadPid(): number {
  return spawnSync(process.execPath, ['-e', '']).pid;
}
