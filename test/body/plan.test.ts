import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { footNames, loadBodyPlan, MAX_REACH, parseBodyPlan } from '../../src/body/index.js';

const bodies = fileURLToPath(new URL('../../envs/bodies/', import.meta.url));
const TRESTLE = join(bodies, 'trestle.json');
const STILT = join(bodies, 'stilt.json');

type Json = Record<string, any>;

/** A fresh, editable copy of the shipped trestle plan's JSON. */
function trestleJson(): Json {
  return JSON.parse(readFileSync(TRESTLE, 'utf8')) as Json;
}

/** The UserError that parsing `json` throws (fails the test when nothing is thrown). */
function rejection(json: unknown): UserError {
  try {
    parseBodyPlan(json, 'plan.json');
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return e as UserError;
  }
  throw new Error('expected parseBodyPlan to throw');
}

describe('shipped body plans', () => {
  it('loads trestle: 9 segments, 8 joints, four feet', () => {
    const plan = loadBodyPlan(TRESTLE);
    expect(plan.name).toBe('trestle');
    expect(plan.segments).toHaveLength(9);
    expect(plan.joints).toHaveLength(8);
    expect(footNames(plan)).toEqual(['front_shin', 'fore_mid_shin', 'hind_mid_shin', 'hind_shin']);
  });

  it('loads stilt: 7 segments, 6 joints, two feet', () => {
    const plan = loadBodyPlan(STILT);
    expect(plan.name).toBe('stilt');
    expect(plan.segments).toHaveLength(7);
    expect(plan.joints).toHaveLength(6);
    expect(footNames(plan)).toEqual(['left_foot', 'right_foot']);
  });

  it('fills documented defaults: gain 10, foot false, angle 0', () => {
    const json = trestleJson();
    delete json.joints[0].gain;
    delete json.segments[1].foot;
    delete json.segments[1].angle;
    const plan = parseBodyPlan(json, 'plan.json');
    expect(plan.joints[0].gain).toBe(10);
    expect(plan.segments[1].foot).toBe(false);
    expect(plan.segments[1].angle).toBe(0);
  });
});

describe('rejects bad plans with a UserError naming the field path', () => {
  it('rejects an unknown key', () => {
    const json = trestleJson();
    json.segments[2].colour = 'red';
    const e = rejection(json);
    expect(e.message).toContain('plan.json: segments[2]');
    expect(e.message).toContain('colour');
  });

  it('rejects a box without size', () => {
    const json = trestleJson();
    delete json.segments[1].size;
    expect(rejection(json).message).toContain('plan.json: segments[1].size: a box needs size');
  });

  it('rejects a circle without radius', () => {
    const json = trestleJson();
    json.segments[3].shape = 'circle';
    delete json.segments[3].size;
    expect(rejection(json).message).toContain('plan.json: segments[3].radius');
  });

  it('rejects a joint naming an unknown segment and lists the known names', () => {
    const json = trestleJson();
    json.joints[0].child = 'tail';
    const e = rejection(json);
    expect(e.message).toContain('plan.json: joints[0].child');
    expect(e.message).toContain('"tail"');
    for (const s of json.segments as Json[]) expect(e.message).toContain(s.name as string);
    // The torso, no longer attached through joints[0]'s child, is not the problem; front_thigh is.
    expect(e.message).toContain('segments[1]: "front_thigh" is not attached');
  });

  it.each([
    ['equal', 60, 60],
    ['above', 61, 60],
  ])('rejects lower %s upper', (_label, lower, upper) => {
    const json = trestleJson();
    json.joints[1].lower = lower;
    json.joints[1].upper = upper;
    expect(rejection(json).message).toContain(`plan.json: joints[1]: lower (${lower}) must be below upper (${upper})`);
  });

  it('rejects a segment that no joint attaches', () => {
    const json = trestleJson();
    json.joints.splice(7, 1); // hind_knee, the only joint holding hind_shin
    expect(rejection(json).message).toContain('plan.json: segments[8]: "hind_shin" is not attached');
  });

  it('rejects duplicate segment names', () => {
    const json = trestleJson();
    json.segments[4].name = 'front_shin';
    expect(rejection(json).message).toContain('plan.json: segments[4].name: duplicate segment name "front_shin"');
  });

  it('rejects a child hanging from two joints', () => {
    const json = trestleJson();
    json.joints[2].child = 'front_thigh';
    expect(rejection(json).message).toContain('plan.json: joints[2].child: "front_thigh" already hangs');
  });

  it('rejects a segment placed 1e9 m from the torso, naming the field', () => {
    const json = trestleJson();
    json.segments[2].position = [1e9, -0.57];
    expect(rejection(json).message).toContain(`plan.json: segments[2].position: expected within ${MAX_REACH} m of the torso centre, found [1000000000, -0.57] (1000000000 m away)`);
  });

  it('rejects a joint anchored 1e9 m below the torso, naming the field', () => {
    const json = trestleJson();
    json.joints[5].anchor = [0, -1e9];
    expect(rejection(json).message).toContain(`plan.json: joints[5].anchor: expected within ${MAX_REACH} m of the torso centre, found [0, -1000000000]`);
  });

  it('accepts a segment and an anchor exactly 10 m away (a 6-8-10 triangle) and refuses one a centimetre farther', () => {
    const json = trestleJson();
    json.segments[1].position = [6, -8];
    json.joints[0].anchor = [-8, 6];
    expect(MAX_REACH).toBe(10);
    expect(() => parseBodyPlan(json, 'plan.json')).not.toThrow();
    json.segments[1].position = [6, -8.01];
    expect(rejection(json).message).toContain('plan.json: segments[1].position: expected within 10 m of the torso centre, found [6, -8.01] (10.01 m away)');
  });

  it('rejects a torso marked as foot', () => {
    const json = trestleJson();
    json.segments[0].foot = true;
    expect(rejection(json).message).toContain('plan.json: segments[0].foot');
  });

  it.each([
    ['segments[1].density', (j: Json) => { j.segments[1].density = 'heavy'; }],
    ['action', (j: Json) => { j.action = 'walk'; }],
    ['rays.count', (j: Json) => { j.rays.count = 2.5; }],
    ['joints[3].anchor', (j: Json) => { j.joints[3].anchor = [0.1]; }],
    ['segments[2].foot', (j: Json) => { j.segments[2].foot = 'yes'; }],
  ])('rejects a wrong type at %s', (path, edit) => {
    const json = trestleJson();
    edit(json);
    expect(rejection(json).message).toContain(`plan.json: ${path}`);
  });

  it('lists every problem at once, each starting with its location', () => {
    const json = trestleJson();
    json.segments[0].foot = true;
    json.joints[1].lower = 90;
    const e = rejection(json);
    expect(e.problems).toHaveLength(2);
    for (const p of e.problems) expect(p.startsWith('plan.json: ')).toBe(true);
  });

  it('rejects a plan without joints', () => {
    const json = trestleJson();
    json.segments = [json.segments[0]];
    json.joints = [];
    expect(rejection(json).message).toContain('plan.json: joints: a walker needs at least one joint');
  });
});

describe('loadBodyPlan file errors', () => {
  const dir = mkdtempSync(join(tmpdir(), 'cairn-plan-'));

  it('names a missing file', () => {
    const path = join(dir, 'nowhere.json');
    expect(() => loadBodyPlan(path)).toThrow(UserError);
    expect(() => loadBodyPlan(path)).toThrow(path);
  });

  it('names a file that is not JSON', () => {
    const path = join(dir, 'broken.json');
    writeFileSync(path, '{"name": "broken",');
    expect(() => loadBodyPlan(path)).toThrow(UserError);
    expect(() => loadBodyPlan(path)).toThrow(`${path}`);
    expect(() => loadBodyPlan(path)).toThrow('not valid JSON');
  });

  it('names the file in field problems', () => {
    const path = join(dir, 'bad.json');
    const json = trestleJson();
    json.segments[0].foot = true;
    writeFileSync(path, JSON.stringify(json));
    expect(() => loadBodyPlan(path)).toThrow(`${path}: segments[0].foot`);
  });
});
