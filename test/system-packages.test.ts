/**
 * test/system-packages.mjs, the first step of `npm test`: it finds the Debian packages the
 * suite uses as outside references, installs missing ones as root with apt-get, and otherwise
 * stops naming them. Here it is pointed (CAIRN_SYSTEM_ROOT, PATH) at fake trees made of small
 * shell scripts, so the real machine's packages are never touched.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT } from './build.js';

const SCRIPT = join(ROOT, 'test/system-packages.mjs');
const ALL = ['python3-numpy', 'python3-jsonschema', 'chromium', 'redis-server'];
const tmp = mkdtempSync(join(tmpdir(), 'cairn-syspkg-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

let made = 0;
/** A fresh directory under the test's temporary folder. */
function dir(): string {
  const d = join(tmp, String(made++));
  mkdirSync(d, { recursive: true });
  return d;
}

function script(file: string, body: string): void {
  mkdirSync(join(file, '..'), { recursive: true });
  writeFileSync(file, `#!/bin/sh\n${body}\n`);
  chmodSync(file, 0o755);
}

/** Runs the check with the given system root and PATH (node itself is run by absolute path). */
function check(systemRoot: string, path: string) {
  const r = spawnSync(process.execPath, [SCRIPT], {
    encoding: 'utf8',
    env: { CAIRN_SYSTEM_ROOT: systemRoot, PATH: path, HOME: tmp },
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A system root whose python3 runs `pythonBody`, with chromium and redis-server present. */
function tree(pythonBody: string): string {
  const sys = dir();
  script(join(sys, 'usr/bin/python3'), pythonBody);
  script(join(sys, 'usr/bin/chromium'), 'exit 0');
  script(join(sys, 'usr/bin/redis-server'), 'exit 0');
  return sys;
}

const sudo = process.getuid?.() === 0 ? '' : 'sudo ';

describe('the system package check before npm test', () => {
  it('stops with exit 1 naming every missing package and the apt-get command when apt-get is absent', () => {
    const r = check(dir(), dir());
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain(`missing: ${ALL.join(', ')} (apt-get was not found on PATH)`);
    expect(r.stderr).toContain(`${sudo}apt-get update && ${sudo}apt-get install -y ${ALL.join(' ')}\n`);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });

  it('names only the packages that are missing', () => {
    // A python3 that has numpy but not jsonschema.
    const r = check(tree('[ "$2" = "import numpy" ] && exit 0\nexit 1'), dir());
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('missing: python3-jsonschema (');
    expect(r.stderr).toContain(`apt-get install -y python3-jsonschema\n`);
  });

  it('passes quietly when every package is there', () => {
    const r = check(tree('exit 0'), dir());
    expect(r).toEqual({ code: 0, stdout: '', stderr: '' });
  });

  it('installs the missing packages with apt-get when run as root, and refuses otherwise', () => {
    const sys = dir();
    const bin = dir();
    const log = join(tmp, 'apt.log');
    script(join(sys, 'usr/bin/python3'), 'exit 0');
    // A fake apt-get that records its calls and "installs" chromium and redis-server.
    script(join(bin, 'apt-get'), [
      `echo "DEBIAN_FRONTEND=$DEBIAN_FRONTEND $*" >> ${log}`,
      '[ "$1" = install ] || exit 0',
      `printf '#!/bin/sh\\nexit 0\\n' > ${sys}/usr/bin/chromium`,
      `printf '#!/bin/sh\\nexit 0\\n' > ${sys}/usr/bin/redis-server`,
      `/bin/chmod 755 ${sys}/usr/bin/chromium ${sys}/usr/bin/redis-server`,
    ].join('\n'));
    const r = check(sys, bin);
    if (process.getuid?.() === 0) {
      expect(r.code).toBe(0);
      expect(r.stderr).toBe('npm test: installing the Debian packages the tests use: chromium redis-server\n');
      expect(readFileSync(log, 'utf8')).toBe(
        'DEBIAN_FRONTEND=noninteractive update -qq\n' +
        'DEBIAN_FRONTEND=noninteractive install -y -qq chromium redis-server\n');
    } else {
      expect(r.code).toBe(1);
      expect(r.stderr).toContain('missing: chromium, redis-server (installing them needs root)');
      expect(existsSync(log)).toBe(false);
    }
  });

  it('stops naming what is still missing when apt-get does not install it', () => {
    const bin = dir();
    script(join(bin, 'apt-get'), 'exit 0');
    const r = check(dir(), bin);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`missing: ${ALL.join(', ')} (`);
  });
});

describe('npm test and CI', () => {
  it('npm test runs the check before compiling, and .ci/run is a clean install plus npm test', () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { scripts: Record<string, string> };
    expect(pkg.scripts.test.startsWith('node test/system-packages.mjs && tsc ')).toBe(true);
    const commands = readFileSync(join(ROOT, '.ci/run'), 'utf8').split('\n')
      .filter((l) => l.trim() !== '' && !l.startsWith('#') && !l.startsWith('set ') && !l.startsWith('cd '));
    expect(commands).toEqual(['npm ci', 'npm test']);
    expect(readFileSync(join(ROOT, 'README.md'), 'utf8')).toMatch(/^ {4}npm test {2,}#/m);
  });
});
