#!/usr/bin/env node
/**
 * First step of `npm test`: the suite checks cairn against programs outside the project, which
 * come from Debian packages a fresh machine may lack:
 *
 *   python3-numpy       reads exported safetensors walkers          (/usr/bin/python3 -c 'import numpy')
 *   python3-jsonschema  validates exports against their JSON Schema (/usr/bin/python3 -c 'import jsonschema')
 *   chromium            opens the HTML report                       (/usr/bin/chromium)
 *   redis-server        serves the queue backend's tests            (/usr/bin/redis-server)
 *
 * When some are missing: as root with apt-get on PATH, they are installed (one line says
 * which); otherwise this stops with exit 1 and one message naming the packages and the
 * command that installs them. Nothing is skipped silently: those tests are our references.
 *
 * CAIRN_SYSTEM_ROOT (default `/`) is the directory the paths above are looked up under, so a
 * test can point this script at a tree where packages are missing. Plain Node, no dependency.
 */
import { spawnSync } from 'node:child_process';
import { accessSync, constants } from 'node:fs';
import { delimiter, join } from 'node:path';

const root = process.env.CAIRN_SYSTEM_ROOT || '/';
const python = join(root, 'usr/bin/python3');

/** True when `file` exists and may be executed. */
function executable(file) {
  try { accessSync(file, constants.X_OK); return true; } catch { return false; }
}

/** True when Debian's python3 imports `module`. */
function pythonHas(module) {
  return executable(python) && spawnSync(python, ['-c', `import ${module}`], { stdio: 'ignore' }).status === 0;
}

const PACKAGES = [
  { name: 'python3-numpy', present: () => pythonHas('numpy') },
  { name: 'python3-jsonschema', present: () => pythonHas('jsonschema') },
  { name: 'chromium', present: () => executable(join(root, 'usr/bin/chromium')) },
  { name: 'redis-server', present: () => executable(join(root, 'usr/bin/redis-server')) },
];

const missing = () => PACKAGES.filter((p) => !p.present()).map((p) => p.name);

/** The apt-get program on PATH, or undefined. */
function aptGet() {
  return (process.env.PATH ?? '').split(delimiter).filter(Boolean)
    .map((dir) => join(dir, 'apt-get')).find(executable);
}

function refuse(names, why) {
  const sudo = process.getuid?.() === 0 ? '' : 'sudo ';
  process.stderr.write(
    `npm test: the tests need Debian packages that are missing: ${names.join(', ')}${why}.\n` +
    `Install them with:\n  ${sudo}apt-get update && ${sudo}apt-get install -y ${names.join(' ')}\n` +
    'then run npm test again.\n');
  process.exit(1);
}

/** Runs apt-get quietly; its output is shown only when it fails. */
function apt(program, args) {
  const r = spawnSync(program, args, {
    encoding: 'utf8',
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
    maxBuffer: 64 * 1024 * 1024,
  });
  if (r.status !== 0) {
    process.stderr.write(`${r.stdout ?? ''}${r.stderr ?? ''}${r.error ? `${r.error.message}\n` : ''}`);
    return false;
  }
  return true;
}

const need = missing();
if (need.length > 0) {
  const program = aptGet();
  if (process.getuid?.() !== 0 || program === undefined) {
    refuse(need, program === undefined ? ' (apt-get was not found on PATH)' : ' (installing them needs root)');
  }
  process.stderr.write(`npm test: installing the Debian packages the tests use: ${need.join(' ')}\n`);
  const installed = apt(program, ['update', '-qq']) && apt(program, ['install', '-y', '-qq', ...need]);
  const still = missing();
  if (!installed || still.length > 0) refuse(still.length > 0 ? still : need, ' (apt-get did not install them)');
}
