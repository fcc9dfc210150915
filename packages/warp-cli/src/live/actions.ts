/**
 * What the live page asks the server to do with a rig it has nudged or fitted: save it into the
 * user's own document (comments and layout kept, as `fit` and `plan` write theirs), and bake meshes
 * with the code `skyfold bake` runs. Files go only into the rig's folder, by plain names, and an
 * existing file is replaced only when the page says so.
 */
import { existsSync } from 'node:fs';
import { basename, extname, join } from 'node:path';
import { ADAPTIVE_DEFAULTS, BAKE_DEFAULTS, rigFromDocument, RigError, validateRigGeometry, type Rig } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { bakeToFiles } from '../commands/bake.js';
import { MESH_FORMATS, type MeshFormat } from '../export/index.js';
import { parseDocumentText, type LoadedRig } from '../io/document-file.js';
import { readDomeMesh } from '../io/dome-mesh-file.js';
import { editedRigText } from '../io/rig-edit.js';
import { writeFileAtomic } from '../io/output-file.js';

/** A request that cannot be served: its status and a one-line reason (sent as `{ error }`). */
export class LiveRequestError extends Error {
  constructor(readonly status: number, message: string) {
    super(message);
    this.name = 'LiveRequestError';
  }
}

/** What the page's POST requests do (save.ts): each takes the parsed body and returns the JSON answer. */
export interface LiveActions {
  save(body: unknown): Promise<unknown>;
  bake(body: unknown): Promise<unknown>;
}

export interface ActionContext {
  loaded: LoadedRig;
  rigPath: string;
  /** The rig document's text as loaded: every save edits this, so each saved file is the user's own plus the changes. */
  rigText: string;
  folder: string;
}

type Json = Record<string, unknown>;

const bad = (message: string) => new LiveRequestError(400, message);

function object(value: unknown, field: string): Json {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) throw bad(`${field}: expected an object`);
  return value as Json;
}

function finite(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw bad(`${field}: expected a finite number`);
  return value;
}

function positive(value: unknown, field: string): number {
  const x = finite(value, field);
  if (x <= 0) throw bad(`${field}: expected a positive number`);
  return x;
}

function vector<N extends number>(value: unknown, field: string, n: N): number[] {
  if (!Array.isArray(value) || value.length !== n) throw bad(`${field}: expected ${n} numbers`);
  return value.map((x, i) => finite(x, `${field}[${i}]`));
}

function unit(value: unknown, field: string): [number, number, number] {
  const v = vector(value, field, 3);
  const l = Math.hypot(...v);
  if (!(l > 1e-12)) throw bad(`${field}: must not be the zero vector`);
  return [v[0] / l, v[1] / l, v[2] / l];
}

/**
 * The rig the page sent (the session's rig, metres and radians, some values changed), on the rig as
 * loaded: only the quantities the page adjusts are taken from it, each checked; the rest (resolution,
 * the as-built dome, the projector's body, the room) stays as loaded. A rig that cannot work is a 400.
 */
export function rigFromPage(value: unknown, base: Rig): Rig {
  const r = object(value, 'rig');
  const dome = object(r.dome, 'rig.dome');
  const mirror = object(r.mirror, 'rig.mirror');
  const projector = object(r.projector, 'rig.projector');
  const content = object(r.content, 'rig.content');
  const capAngle = positive(mirror.capAngle, 'rig.mirror.capAngle');
  if (capAngle > Math.PI) throw bad('rig.mirror.capAngle: expected at most π (radians)');
  const fov = positive(content.fov, 'rig.content.fov');
  if (fov > 2 * Math.PI) throw bad('rig.content.fov: expected at most 2π (radians)');
  const rig: Rig = {
    ...base,
    dome: { ...base.dome, radius: positive(dome.radius, 'rig.dome.radius'), ...(dome.floor === undefined || dome.floor === null ? {} : { floor: positive(dome.floor, 'rig.dome.floor') }) },
    mirror: {
      center: vector(mirror.center, 'rig.mirror.center', 3) as [number, number, number],
      radius: positive(mirror.radius, 'rig.mirror.radius'),
      axis: unit(mirror.axis, 'rig.mirror.axis'),
      capAngle,
    },
    projector: {
      ...base.projector,
      position: vector(projector.position, 'rig.projector.position', 3) as [number, number, number],
      lookAt: vector(projector.lookAt, 'rig.projector.lookAt', 3) as [number, number, number],
      roll: finite(projector.roll, 'rig.projector.roll'),
      throwRatio: positive(projector.throwRatio, 'rig.projector.throwRatio'),
      lensShift: vector(projector.lensShift, 'rig.projector.lensShift', 2) as [number, number],
    },
    content: {
      ...base.content,
      fov,
      eye: vector(content.eye, 'rig.content.eye', 3) as [number, number, number],
    },
  };
  if (projector.up !== undefined && projector.up !== null) rig.projector.up = unit(projector.up, 'rig.projector.up');
  if (content.azimuth !== undefined && content.azimuth !== null) rig.content.azimuth = finite(content.azimuth, 'rig.content.azimuth');
  try {
    validateRigGeometry(rig);
  } catch (e) {
    if (e instanceof RigError) throw bad(`rig: ${e.message}`);
    throw e;
  }
  return rig;
}

/** A plain file name in the rig's folder: no folders, nothing hidden, a bounded length. */
function plainName(value: unknown, field: string): string {
  if (typeof value !== 'string' || value === '' || value.length > 200) throw bad(`${field}: expected a file name`);
  if (value !== basename(value) || /[/\\\0]/.test(value) || value.startsWith('.')) throw bad(`${field}: expected a plain file name in the rig's folder, got "${value.slice(0, 60)}"`);
  return value;
}

function stem(rigPath: string): string {
  const name = basename(rigPath);
  return name.slice(0, name.length - extname(name).length);
}

function refuseExisting(path: string, overwrite: boolean): void {
  if (!overwrite && existsSync(path)) throw new LiveRequestError(409, `${basename(path)} already exists; save again with overwrite to replace it`);
}

/** The edited document's text: the user's own with only the changed values changed (rig-edit.ts). */
export function savedRigText(rigText: string, before: Rig, after: Rig): string {
  return editedRigText(rigText, before, after);
}

export function liveActions(c: ActionContext): LiveActions {
  return {
    async save(body) {
      const b = object(body, 'body');
      const after = rigFromPage(b.rig, c.loaded.rig);
      const file = b.file === undefined ? `${stem(c.rigPath)}.live.yaml` : plainName(b.file, 'file');
      // the document is written as YAML (a JSON rig's text is YAML too, so it edits the same way)
      if (!/\.ya?ml$/i.test(file)) throw bad(`file: expected a .yaml or .yml name, got "${file.slice(0, 60)}"`);
      const path = join(c.folder, file);
      refuseExisting(path, b.overwrite === true);
      const text = savedRigText(c.rigText, c.loaded.rig, after);
      // read back before writing: the file must load as the rig the page sent
      try {
        rigFromDocument(parseDocumentText(text, file), { loadMesh: (mesh) => readDomeMesh(path, mesh) });
      } catch (e) {
        if (e instanceof RigError || e instanceof UserError) throw new LiveRequestError(500, `the edited rig does not read back: ${e.message}`);
        throw e;
      }
      writeFileAtomic(path, text);
      return { file };
    },
    async bake(body) {
      const b = object(body, 'body');
      const rig = rigFromPage(b.rig, c.loaded.rig);
      if (!Array.isArray(b.formats) || b.formats.length === 0) throw bad(`formats: expected a list of mesh formats (${MESH_FORMATS.join(', ')})`);
      const formats = [...new Set(b.formats)].map((f) => {
        if (typeof f !== 'string' || !MESH_FORMATS.includes(f as MeshFormat)) throw bad(`formats: expected each of ${MESH_FORMATS.join(', ')}, got ${JSON.stringify(f).slice(0, 40)}`);
        return f as MeshFormat;
      });
      // "show" or "show.glb" both name show.glb, show.mpcdi, ...
      const out = b.out === undefined ? `${stem(c.rigPath)}.live` : plainName(b.out, 'out').replace(new RegExp(`\\.(${MESH_FORMATS.join('|')})$`, 'i'), '');
      const targets = formats.map((format) => ({ path: join(c.folder, `${out}.${format}`), format }));
      for (const t of targets) refuseExisting(t.path, b.overwrite === true);
      await bakeToFiles(rig, c.rigPath, targets, {
        tolerance: BAKE_DEFAULTS.tolerance,
        masterSize: BAKE_DEFAULTS.masterSize,
        brightness: BAKE_DEFAULTS.brightness,
        brightnessFloor: BAKE_DEFAULTS.brightnessFloor,
        feather: BAKE_DEFAULTS.feather,
        alphaResolution: 'grid',
        smallestCell: ADAPTIVE_DEFAULTS.smallestCell,
      });
      return { files: targets.map((t) => basename(t.path)) };
    },
  };
}
