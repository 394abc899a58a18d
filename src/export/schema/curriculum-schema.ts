/**
 * The curriculum JSON Schema (draft 2020-12). It is a module rather than a .json file read at
 * run time so that it is compiled into dist/ with the rest of cairn: an installed package
 * never needs src/. `cairn export` writes it beside each curriculum as curriculum.schema.json.
 * Feature kinds come from the kind registry, so adding a kind does not touch this file.
 */
import { KIND_NAMES } from '../../terrain/index.js';

export const CURRICULUM_SCHEMA: Readonly<Record<string, unknown>> = {
  "$schema": "https://json-schema.org/draft/2020-12/schema",
  "$id": "urn:cairn:curriculum:1",
  "title": "cairn curriculum",
  "description": "An ordered list of 2D locomotion courses with their geometry, difficulty figures and the walkers that crossed them. Units: metres, seconds, radians unless a field says otherwise.",
  "type": "object",
  "required": ["format", "version", "run", "order", "only", "descriptorNames", "physics", "episode", "solveThreshold", "body", "family", "policy", "courses"],
  "additionalProperties": false,
  "properties": {
    "$schema": { "type": "string" },
    "format": { "const": "cairn-curriculum" },
    "version": { "const": 1 },
    "run": {
      "type": "object",
      "required": ["name", "seed", "iteration", "fingerprint", "recipeHash"],
      "additionalProperties": false,
      "properties": {
        "name": { "type": "string" },
        "seed": { "type": "integer", "minimum": 0 },
        "iteration": { "type": "integer", "minimum": 0, "description": "Iteration of the checkpoint exported." },
        "fingerprint": { "$ref": "#/$defs/sha256" },
        "recipeHash": { "$ref": "#/$defs/sha256" }
      }
    },
    "order": { "enum": ["admission", "difficulty"] },
    "only": { "enum": ["solved", "crossed", "all"], "description": "Which courses were kept: solved ones, crossed or solved ones, or all." },
    "difficultyMeasure": { "type": "string" },
    "descriptorNames": { "type": "array", "items": { "type": "string" }, "minItems": 1 },
    "physics": {
      "type": "object",
      "required": ["gravity", "timeStep", "velocityIterations", "positionIterations"],
      "additionalProperties": false,
      "properties": {
        "gravity": { "type": "number", "minimum": 0, "description": "m/s², along −y." },
        "timeStep": { "type": "number", "exclusiveMinimum": 0, "description": "s." },
        "velocityIterations": { "type": "integer", "minimum": 1 },
        "positionIterations": { "type": "integer", "minimum": 1 }
      }
    },
    "episode": {
      "type": "object",
      "required": ["maxSteps", "stallSeconds", "stallDistance", "fallPenalty"],
      "additionalProperties": false,
      "properties": {
        "maxSteps": { "type": "integer", "minimum": 1 },
        "stallSeconds": { "type": "number", "exclusiveMinimum": 0 },
        "stallDistance": { "type": "number", "minimum": 0 },
        "fallPenalty": { "type": "number", "minimum": 0 }
      }
    },
    "solveThreshold": { "$ref": "#/$defs/progress" },
    "training": {
      "type": "object",
      "description": "How the run trained and confirmed walkers (absent in exports written before it was recorded).",
      "required": ["es", "trainingPush", "solve"],
      "additionalProperties": false,
      "properties": {
        "es": {
          "type": "object",
          "description": "Evolution strategies settings: candidates per step (even, mirrored), perturbation scale, Adam step size and moments, weight decay.",
          "required": ["population", "sigma", "learningRate", "beta1", "beta2", "epsilon", "weightDecay"],
          "additionalProperties": false,
          "properties": {
            "population": { "type": "integer", "minimum": 2, "multipleOf": 2 },
            "sigma": { "type": "number", "exclusiveMinimum": 0 },
            "learningRate": { "type": "number", "exclusiveMinimum": 0 },
            "beta1": { "type": "number", "minimum": 0, "exclusiveMaximum": 1 },
            "beta2": { "type": "number", "minimum": 0, "exclusiveMaximum": 1 },
            "epsilon": { "type": "number", "exclusiveMinimum": 0 },
            "weightDecay": { "type": "number", "minimum": 0 }
          }
        },
        "trainingPush": { "type": "number", "minimum": 0, "description": "Largest horizontal push on the torso at the start of ES candidate rollouts, N·s (0 = none)." },
        "solve": {
          "type": "object",
          "description": "Solve confirmation: this many rollouts under the stricter solver (twice the velocity and position iterations), the first unpushed, the rest pushed by up to `push` N·s; all must reach solveThreshold.",
          "required": ["checks", "push"],
          "additionalProperties": false,
          "properties": { "checks": { "type": "integer", "minimum": 0 }, "push": { "type": "number", "minimum": 0 } }
        }
      }
    },
    "body": {
      "type": "object",
      "required": ["file", "name", "actionMode", "observation", "actions"],
      "additionalProperties": false,
      "properties": {
        "file": { "type": "string" },
        "name": { "type": "string" },
        "actionMode": { "enum": ["target-angle", "speed", "torque"] },
        "observation": { "type": "array", "items": { "type": "string" }, "minItems": 1 },
        "actions": { "type": "array", "items": { "type": "string" }, "minItems": 1 }
      }
    },
    "family": {
      "type": "object",
      "required": ["file", "name"],
      "additionalProperties": false,
      "properties": { "file": { "type": "string" }, "name": { "type": "string" } }
    },
    "policy": {
      "type": "object",
      "required": ["inputs", "hidden", "outputs", "activation"],
      "additionalProperties": false,
      "properties": {
        "inputs": { "type": "integer", "minimum": 1 },
        "hidden": { "type": "array", "items": { "type": "integer", "minimum": 1 } },
        "outputs": { "type": "integer", "minimum": 1 },
        "activation": { "enum": ["tanh", "relu", "linear"] }
      }
    },
    "courses": { "type": "array", "items": { "$ref": "#/$defs/course" } }
  },
  "$defs": {
    "sha256": { "type": "string", "pattern": "^[0-9a-f]{64}$" },
    "progress": { "type": "number", "minimum": 0, "maximum": 1 },
    "point": { "type": "array", "prefixItems": [{ "type": "number" }, { "type": "number" }], "minItems": 2, "maxItems": 2 },
    "walkerRef": {
      "type": "object",
      "required": ["id", "iteration", "file", "sha256"],
      "additionalProperties": false,
      "properties": {
        "id": { "type": "integer", "minimum": 0 },
        "iteration": { "type": "integer", "minimum": 0 },
        "file": { "type": "string", "description": "safetensors file, relative to the curriculum." },
        "sha256": { "$ref": "#/$defs/sha256" }
      }
    },
    "feature": {
      "type": "object",
      "required": ["kind", "x"],
      "properties": { "kind": { "enum": [...KIND_NAMES] }, "x": { "type": "number" } },
      "additionalProperties": { "type": "number" }
    },
    "course": {
      "type": "object",
      "required": ["id", "parent", "admittedAt", "status", "archivedAt", "genome", "descriptor", "difficulty", "geometry", "admission", "best", "solvedAt", "solvedBy", "holders"],
      "additionalProperties": false,
      "properties": {
        "id": { "type": "integer", "minimum": 0 },
        "parent": { "type": ["integer", "null"], "minimum": 0 },
        "admittedAt": { "type": "integer", "minimum": 0 },
        "status": { "enum": ["active", "archived"] },
        "archivedAt": { "type": ["integer", "null"] },
        "genome": {
          "type": "object",
          "required": ["roughness", "features"],
          "additionalProperties": false,
          "properties": {
            "roughness": {
              "type": "object",
              "required": ["amplitude", "seed"],
              "additionalProperties": false,
              "properties": { "amplitude": { "type": "number", "minimum": 0 }, "seed": { "type": "integer", "minimum": 0 } }
            },
            "features": { "type": "array", "items": { "$ref": "#/$defs/feature" } }
          }
        },
        "descriptor": { "type": "array", "items": { "type": "number", "minimum": 0 } },
        "difficulty": { "type": "number", "minimum": 0, "maximum": 1 },
        "geometry": {
          "type": "object",
          "required": ["ground", "obstacles", "friction", "startX", "finishX", "spawnGroundY"],
          "additionalProperties": false,
          "properties": {
            "ground": { "type": "array", "items": { "$ref": "#/$defs/point" }, "minItems": 2, "description": "Ground polyline; x never decreases." },
            "obstacles": { "type": "array", "items": { "type": "array", "items": { "$ref": "#/$defs/point" }, "minItems": 3 }, "description": "Convex polygons, counter-clockwise." },
            "friction": { "type": "number", "minimum": 0 },
            "startX": { "type": "number" },
            "finishX": { "type": "number" },
            "spawnGroundY": { "type": "number" }
          }
        },
        "admission": {
          "type": "object",
          "required": ["bestProgress", "walkerId", "novelty", "band"],
          "additionalProperties": false,
          "properties": {
            "bestProgress": { "$ref": "#/$defs/progress" },
            "walkerId": { "type": ["integer", "null"] },
            "novelty": { "type": "number", "minimum": 0 },
            "band": { "type": "array", "items": { "$ref": "#/$defs/progress" }, "minItems": 2, "maxItems": 2 }
          }
        },
        "best": {
          "type": "object",
          "required": ["progress", "walker"],
          "additionalProperties": false,
          "properties": { "progress": { "$ref": "#/$defs/progress" }, "walker": { "$ref": "#/$defs/walkerRef" } }
        },
        "crossedAt": { "type": ["integer", "null"], "description": "First iteration some walker reached solveThreshold on it under the run's own solver (null: never). Absent in exports written before it was recorded." },
        "solvedAt": { "type": ["integer", "null"] },
        "rollouts": { "type": "integer", "minimum": 0, "description": "Rollouts run on this course: its pair's ES steps, solve confirmations, transfers onto it." },
        "lineageRollouts": { "type": "integer", "minimum": 0, "description": "`rollouts` summed over this course and every ancestor (parent, its parent, ... up to a starting course)." },
        "solvedBy": {
          "oneOf": [
            { "type": "null" },
            {
              "type": "object",
              "required": ["progress", "walker"],
              "additionalProperties": false,
              "properties": { "progress": { "$ref": "#/$defs/progress" }, "walker": { "$ref": "#/$defs/walkerRef" } }
            }
          ]
        },
        "source": {
          "type": "object",
          "description": "Only for a course a branched run started from: the source run's fingerprint and the course's id there.",
          "required": ["fingerprint", "courseId"],
          "additionalProperties": false,
          "properties": { "fingerprint": { "$ref": "#/$defs/sha256" }, "courseId": { "type": "integer", "minimum": 0 } }
        },
        "holders": {
          "type": "array",
          "items": {
            "type": "object",
            "required": ["walkerId", "since", "how"],
            "additionalProperties": false,
            "properties": { "walkerId": { "type": "integer" }, "since": { "type": "integer" }, "how": { "enum": ["seed", "zero-shot", "fine-tuned"] } }
          }
        }
      }
    }
  }
};
