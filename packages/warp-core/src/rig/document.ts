/**
 * Rig documents (the parsed YAML/JSON of a rig file) → the Rig model, validating at the boundary:
 * every error names the dotted field, what was expected and what came.
 */
import { vec3 } from 'gl-matrix';
import { DEG, length, RAD, type Vec3 } from '../math.js';
import { MAX_PROJECTOR_SIDE, RigError, validateRigGeometry, type EyeBandName, type ProjectorBody, type Rig, type RoomModel } from './model.js';
import { DomeMesh, MAX_DOME_TRIANGLES, type TriangleSoup } from '../optics/dome-mesh.js';
import { canonicalUnit, fromMetres, isLengthUnit, LENGTH_UNITS, LengthSyntaxError, METRES_PER_UNIT, parseLengthString, type LengthUnit } from '../units.js';

type Doc = Record<string, unknown>;

/** Lengths beyond this are typing mistakes, not rigs (and would overflow the optics). */
const MAX_LENGTH = 1e4;
/** The shortest size of a part (radius, width, depth) a rig may give, in metres. */
const MIN_POSITIVE_LENGTH = 1e-6;
/** The narrowest content field of view, degrees: narrower ones divide by nearly zero in the fisheye. */
const MIN_FOV = 0.01;

/** The fields a rig document may hold, by section; used for unknown-field checks with a did-you-mean. */
export const RIG_FIELDS: Readonly<Record<string, readonly string[]>> = {
  '': ['units', 'name', 'notes', 'dome', 'projector', 'mirror', 'content', 'room'],
  dome: ['radius', 'diameter', 'floor', 'mesh', 'meshUnits'],
  mirror: ['radius', 'cap', 'center', 'pole', 'axis', 'capAngle'],
  'mirror.cap': ['width', 'depth'],
  projector: ['position', 'lookAt', 'roll', 'up', 'resolution', 'throwRatio', 'lensShift', 'body', 'aperture', 'minFocus'],
  'projector.body': ['width', 'length', 'height'],
  content: ['fov', 'eye', 'azimuth'],
  room: ['mirror', 'lensHeight', 'audience', 'leastLit', 'maxShadow'],
  'room.mirror': ['along', 'within'],
  'room.audience': ['center', 'radius', 'eyes'],
};

const EYE_BAND_NAMES: readonly EyeBandName[] = ['floor-seated', 'seated', 'standing'];

/** The `room` section: where the planner may put things (README "Planning"). */
function roomFromDocument(doc: Doc, r: FieldReader): RoomModel | undefined {
  const room = section(doc, 'room', false);
  if (!room) return undefined;
  checkKnownFields(room, 'room', RIG_FIELDS.room);
  const out: RoomModel = {};
  if (room.mirror !== undefined) {
    const m = room.mirror;
    if (m === 'fixed' || m === 'edge') out.mirror = { kind: m };
    else if (typeof m === 'object' && m !== null && !Array.isArray(m)) {
      const place = m as Doc;
      checkKnownFields(place, 'room.mirror', RIG_FIELDS['room.mirror']);
      const keys = Object.keys(place);
      if (keys.length !== 1) throw new RigError('room.mirror', 'give one of along or within');
      const key = keys[0] as 'along' | 'within';
      const ends = place[key];
      if (!Array.isArray(ends) || ends.length !== 2) throw new RigError(`room.mirror.${key}`, `expected two points [[x, y, z], [x, y, z]], got ${showValue(ends)}`);
      const a = r.point(ends[0], `room.mirror.${key}[0]`);
      const b = r.point(ends[1], `room.mirror.${key}[1]`);
      if (key === 'along') {
        if (length([b[0] - a[0], b[1] - a[1], b[2] - a[2]]) < 1e-6) throw new RigError('room.mirror.along', 'its two ends must differ');
        out.mirror = { kind: 'along', from: a, to: b };
      } else {
        out.mirror = { kind: 'within', min: [Math.min(a[0], b[0]), Math.min(a[1], b[1]), Math.min(a[2], b[2])], max: [Math.max(a[0], b[0]), Math.max(a[1], b[1]), Math.max(a[2], b[2])] };
      }
    } else throw new RigError('room.mirror', `expected fixed, edge, {along: [A, B]} or {within: [A, B]}, got ${showValue(m)}`);
  }
  if (room.lensHeight !== undefined) {
    const h = room.lensHeight;
    if (!Array.isArray(h) || h.length !== 2) throw new RigError('room.lensHeight', `expected two heights above the floor [lowest, highest], got ${showValue(h)}`);
    const lo = r.length(h[0], 'room.lensHeight[0]', 'non-negative');
    const hi = r.length(h[1], 'room.lensHeight[1]', 'non-negative');
    if (hi < lo) throw new RigError('room.lensHeight', `expected the lowest height first, got ${showValue(h)}`);
    out.lensHeight = [lo, hi];
  }
  if (room.audience === 'none') out.audience = null;
  else if (room.audience !== undefined) {
    const a = section(room, 'audience', true)!;
    checkKnownFields(a, 'room.audience', RIG_FIELDS['room.audience']);
    const c = need(a, 'center', 'room.audience');
    if (!Array.isArray(c) || c.length !== 2) throw new RigError('room.audience.center', `expected a floor point [x, y], got ${showValue(c)}`);
    const eyes = a.eyes === undefined ? [...EYE_BAND_NAMES] : a.eyes;
    if (!Array.isArray(eyes) || !eyes.every((e) => EYE_BAND_NAMES.includes(e as EyeBandName))) throw new RigError('room.audience.eyes', `expected a list of ${EYE_BAND_NAMES.join(', ')}, got ${showValue(a.eyes)}`);
    out.audience = {
      center: [r.length(c[0], 'room.audience.center[0]'), r.length(c[1], 'room.audience.center[1]')],
      radius: r.length(need(a, 'radius', 'room.audience'), 'room.audience.radius', 'positive'),
      eyes: [...new Set(eyes as EyeBandName[])],
    };
  }
  if (room.leastLit !== undefined) out.leastLit = r.number(room.leastLit, 'room.leastLit', (x) => x >= 0 && x < 1, 'a share from 0 to below 1 (0.25 = a quarter of the pixels)');
  if (room.maxShadow !== undefined) out.maxShadow = r.number(room.maxShadow, 'room.maxShadow', (x) => x >= 0 && x <= 1, 'a share from 0 to 1');
  return out;
}

/** Error lines quote at most this much of the input (a file may hold megabytes in one token). */
const QUOTE_CHARS = 60;

/** A piece of text as a short quoted string: at most QUOTE_CHARS characters of it, "…" marking a cut. */
export function shortQuote(text: string): string {
  return JSON.stringify(text.length > QUOTE_CHARS ? text.slice(0, QUOTE_CHARS - 1) + '…' : text);
}

/** Shows a value the way it appeared in the file: strings quoted, others as JSON; always short. */
export function showValue(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'null';
  if (typeof v === 'string') return shortQuote(v);
  if (typeof v === 'number') return String(v);
  return shortJson(v);
}

function shortJson(v: unknown): string {
  try {
    const s = JSON.stringify(v) ?? String(v);
    return s.length > QUOTE_CHARS ? s.slice(0, QUOTE_CHARS - 3) + '...' : s;
  } catch {
    return typeof v;
  }
}

function editDistance(a: string, b: string): number {
  const dp = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let prev = dp[0];
    dp[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const t = dp[j];
      dp[j] = Math.min(dp[j] + 1, dp[j - 1] + 1, prev + (a[i - 1] === b[j - 1] ? 0 : 1));
      prev = t;
    }
  }
  return dp[b.length];
}

/** The known name nearest to `name`, if it is near enough to be a likely typo. */
export function didYouMean(name: string, known: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  for (const k of known) {
    const d = editDistance(name.toLowerCase(), k.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = k;
    }
  }
  return best !== undefined && bestD <= Math.max(1, Math.floor(best.length / 3)) ? best : undefined;
}

/** Reads lengths, angles and vectors from one document with one default unit. */
export class FieldReader {
  constructor(readonly units: LengthUnit) {}

  /** A length in metres from a number (in the document's units) or a string with its own unit. */
  length(v: unknown, field: string, what: 'positive' | 'non-negative' | 'any' = 'any'): number {
    const expected = what === 'any' ? 'a length' : `a ${what} length`;
    let metres: number;
    if (typeof v === 'number' && Number.isFinite(v)) {
      metres = v * METRES_PER_UNIT[this.units];
    } else if (typeof v === 'string') {
      try {
        metres = parseLengthString(v);
      } catch (e) {
        if (e instanceof LengthSyntaxError && e.unit !== undefined) {
          throw new RigError(field, `unknown unit "${e.unit}" in ${showValue(v)} (expected one of ${LENGTH_UNITS.join(', ')})`);
        }
        throw new RigError(field, `expected ${expected} (a number, or a string such as "2.4 m" or "7 ft 6 in"), got ${showValue(v)}`);
      }
    } else {
      throw new RigError(field, `expected ${expected}, got ${showValue(v)}`);
    }
    if ((what === 'positive' && !(metres > 0)) || (what === 'non-negative' && !(metres >= 0)) || !Number.isFinite(metres)) {
      throw new RigError(field, `expected ${expected}, got ${showValue(v)}`);
    }
    if (Math.abs(metres) > MAX_LENGTH) {
      throw new RigError(field, `expected ${expected} within 10 km, got ${showValue(v)}`);
    }
    if (what === 'positive' && metres < MIN_POSITIVE_LENGTH) {
      // a part thinner than a micrometre is a typing mistake, and its squares underflow in the optics
      throw new RigError(field, `expected ${expected} of at least 1 micrometre, got ${showValue(v)}`);
    }
    return metres;
  }

  point(v: unknown, field: string): Vec3 {
    if (!Array.isArray(v) || v.length !== 3) throw new RigError(field, `expected a point [x, y, z] of three lengths, got ${showValue(v)}`);
    return [this.length(v[0], `${field}[0]`), this.length(v[1], `${field}[1]`), this.length(v[2], `${field}[2]`)];
  }

  /** A direction: three numbers of any length (not all zero), returned normalized. */
  direction(v: unknown, field: string): Vec3 {
    if (!Array.isArray(v) || v.length !== 3 || !v.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw new RigError(field, `expected a direction [x, y, z] of three numbers, got ${showValue(v)}`);
    }
    const d: Vec3 = [v[0], v[1], v[2]];
    if (!Number.isFinite(length(d))) throw new RigError(field, `expected a direction of moderate numbers (its length overflows), got ${showValue(v)}`);
    if (!(length(d) > 1e-12)) throw new RigError(field, `expected a non-zero direction, got ${showValue(v)}`);
    return vec3.normalize(d, d) as Vec3;
  }

  number(v: unknown, field: string, check?: (x: number) => boolean, expected = 'a number'): number {
    if (typeof v !== 'number' || !Number.isFinite(v) || (check && !check(v))) throw new RigError(field, `expected ${expected}, got ${showValue(v)}`);
    return v;
  }

  pair(v: unknown, field: string): [number, number] {
    if (!Array.isArray(v) || v.length !== 2 || !v.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw new RigError(field, `expected two numbers [x, y], got ${showValue(v)}`);
    }
    return [v[0], v[1]];
  }
}

function section(doc: Doc, key: string, required: boolean): Doc | undefined {
  const v = doc[key];
  if (v === undefined || v === null) {
    if (required) throw new RigError(key, 'is missing');
    return undefined;
  }
  if (typeof v !== 'object' || Array.isArray(v)) throw new RigError(key, `expected a section of fields, got ${showValue(v)}`);
  return v as Doc;
}

/** Throws on a field the rig format does not have, suggesting the nearest known one. */
export function checkKnownFields(obj: Doc, path: string, known: readonly string[]): void {
  for (const key in obj) {
    if (!Object.hasOwn(obj, key)) continue;
    if (!known.includes(key)) {
      // a long key is no typo of a short name: skip the edit distance, quote a piece of it
      const hint = key.length <= 40 ? didYouMean(key, known) : undefined;
      const name = key.length <= 40 && /^[\w-]+$/.test(key) ? key : shortQuote(key);
      const field = path ? `${path}.${name}` : name;
      throw new RigError(field, `unknown field${hint ? `; did you mean "${hint}"?` : ` (known here: ${known.join(', ')})`}`);
    }
  }
}

function need(obj: Doc, key: string, path: string): unknown {
  const v = obj[key];
  if (v === undefined || v === null) throw new RigError(`${path}.${key}`, 'is missing');
  return v;
}

export interface ParsedRig {
  rig: Rig;
  warnings: string[];
}

/** Reads the document's `units` (default metres). */
export function documentUnits(doc: Doc, field = 'units'): LengthUnit {
  const u = doc.units;
  if (u === undefined || u === null) return 'm';
  if (!isLengthUnit(u)) {
    const hint = typeof u === 'string' ? (canonicalUnit(u) ?? didYouMean(u, LENGTH_UNITS)) : undefined;
    throw new RigError(field, `unknown unit ${showValue(u)} (expected one of ${LENGTH_UNITS.join(', ')})${hint ? `; did you mean "${hint}"?` : ''}`);
  }
  return u;
}

export interface RigDocumentOptions {
  /**
   * Reads the triangle file `dome.mesh` names (a path relative to the rig file's folder), in the file's
   * own units; throws its own error (naming the file and line) when it cannot. The core reads no files.
   */
  loadMesh?: (file: string) => TriangleSoup;
}

/**
 * A parsed rig document → a validated Rig. Throws RigError naming the field. Warnings are for rigs that
 * work but are probably not what was meant (see `rigWarnings`).
 */
export function rigFromDocument(input: unknown, options: RigDocumentOptions = {}): Rig {
  if (typeof input !== 'object' || input === null || Array.isArray(input)) throw new RigError('', `expected a rig document (a mapping of dome, projector, mirror and content), got ${showValue(input)}`);
  const doc = input as Doc;
  checkKnownFields(doc, '', RIG_FIELDS['']);
  const units = documentUnits(doc);
  const r = new FieldReader(units);

  const dome = section(doc, 'dome', true)!;
  checkKnownFields(dome, 'dome', RIG_FIELDS.dome);
  let domeRadius: number;
  if (dome.radius !== undefined && dome.diameter !== undefined) throw new RigError('dome', 'give dome.radius or dome.diameter, not both');
  if (dome.radius !== undefined) domeRadius = r.length(dome.radius, 'dome.radius', 'positive');
  else if (dome.diameter !== undefined) domeRadius = r.length(dome.diameter, 'dome.diameter', 'positive') / 2;
  else throw new RigError('dome.radius', 'is missing (give dome.radius or dome.diameter)');
  const floor = dome.floor === undefined ? undefined : r.length(dome.floor, 'dome.floor', 'positive');
  const mesh = domeMeshFromDocument(dome, units, options);

  const mirror = section(doc, 'mirror', true)!;
  checkKnownFields(mirror, 'mirror', RIG_FIELDS.mirror);
  if (mirror.radius !== undefined && mirror.cap !== undefined) throw new RigError('mirror', 'give mirror.radius or mirror.cap, not both');
  let mirrorRadius: number;
  let capAngleFromCap: number | undefined;
  if (mirror.radius !== undefined) {
    mirrorRadius = r.length(mirror.radius, 'mirror.radius', 'positive');
  } else if (mirror.cap !== undefined) {
    const cap = section(mirror, 'cap', true)!;
    checkKnownFields(cap, 'mirror.cap', RIG_FIELDS['mirror.cap']);
    const width = r.length(need(cap, 'width', 'mirror.cap'), 'mirror.cap.width', 'positive');
    const depth = r.length(need(cap, 'depth', 'mirror.cap'), 'mirror.cap.depth', 'positive');
    mirrorRadius = sagittaRadius(width, depth);
    // the cap's half-angle from its rim: r − depth is negative for a cap deeper than a hemisphere (more than 90°)
    capAngleFromCap = Math.atan2(width / 2, mirrorRadius - depth);
  } else {
    throw new RigError('mirror.radius', 'is missing (give mirror.radius, or mirror.cap with width and depth)');
  }
  const axis = mirror.axis === undefined ? ([0, 0, 1] as Vec3) : r.direction(mirror.axis, 'mirror.axis');
  if (mirror.center !== undefined && mirror.pole !== undefined) throw new RigError('mirror', 'give mirror.center or mirror.pole, not both');
  let center: Vec3;
  if (mirror.pole !== undefined) {
    // the apex a tape reaches: the sphere's centre lies one radius behind it, along the axis (DESIGN.md "As-built domes")
    const pole = r.point(mirror.pole, 'mirror.pole');
    center = [pole[0] - mirrorRadius * axis[0], pole[1] - mirrorRadius * axis[1], pole[2] - mirrorRadius * axis[2]];
  } else if (mirror.center !== undefined) {
    center = r.point(mirror.center, 'mirror.center');
  } else throw new RigError('mirror.center', 'is missing (give mirror.center, or mirror.pole: the apex of the cap)');
  const capAngle =
    mirror.capAngle !== undefined
      ? r.number(mirror.capAngle, 'mirror.capAngle', (x) => x > 0 && x <= 180, 'an angle in (0, 180] degrees') * DEG
      : (capAngleFromCap ?? Math.PI / 2);

  const proj = section(doc, 'projector', true)!;
  checkKnownFields(proj, 'projector', RIG_FIELDS.projector);
  const position = r.point(need(proj, 'position', 'projector'), 'projector.position');
  const lookAt = r.point(need(proj, 'lookAt', 'projector'), 'projector.lookAt');
  const roll = proj.roll === undefined ? 0 : r.number(proj.roll, 'projector.roll', undefined, 'an angle in degrees') * DEG;
  const up = proj.up === undefined ? undefined : r.direction(proj.up, 'projector.up');
  const resV = need(proj, 'resolution', 'projector');
  if (!Array.isArray(resV) || resV.length !== 2 || !resV.every((x) => typeof x === 'number' && Number.isInteger(x) && x > 0)) {
    throw new RigError('projector.resolution', `expected two positive whole numbers [width, height], got ${showValue(resV)}`);
  }
  if (resV[0] > MAX_PROJECTOR_SIDE || resV[1] > MAX_PROJECTOR_SIDE) {
    throw new RigError('projector.resolution', `expected at most ${MAX_PROJECTOR_SIDE} pixels a side (8K is beyond any projector), got ${showValue(resV)}`);
  }
  const throwRatio = r.number(need(proj, 'throwRatio', 'projector'), 'projector.throwRatio', (x) => x > 0 && x >= 1e-3 && x <= 1e3, 'a positive number (throw distance / image width, 0.001 to 1000)');
  const lensShift = proj.lensShift === undefined ? ([0, 0] as [number, number]) : r.pair(proj.lensShift, 'projector.lensShift');
  if (Math.abs(lensShift[0]) > 100 || Math.abs(lensShift[1]) > 100) throw new RigError('projector.lensShift', `expected fractions of the image size (within ±100), got ${showValue(proj.lensShift)}`);
  let body: ProjectorBody | undefined;
  if (proj.body !== undefined) {
    const b = section(proj, 'body', true)!;
    checkKnownFields(b, 'projector.body', RIG_FIELDS['projector.body']);
    body = {
      width: r.length(need(b, 'width', 'projector.body'), 'projector.body.width', 'positive'),
      length: r.length(need(b, 'length', 'projector.body'), 'projector.body.length', 'positive'),
      height: r.length(need(b, 'height', 'projector.body'), 'projector.body.height', 'positive'),
    };
  }
  const aperture = proj.aperture === undefined ? undefined : apertureLength(r, proj.aperture);
  const minFocus = proj.minFocus === undefined ? undefined : r.length(proj.minFocus, 'projector.minFocus', 'positive');

  const content = section(doc, 'content', false) ?? {};
  checkKnownFields(content, 'content', RIG_FIELDS.content);
  const fovDeg = content.fov === undefined ? 180 : r.number(content.fov, 'content.fov', (x) => x > 0 && x <= 360, 'an angle in (0, 360] degrees');
  if (fovDeg < MIN_FOV) throw new RigError('content.fov', `expected a field of view of at least ${MIN_FOV} degrees, got ${showValue(content.fov)}`);
  const eye = content.eye === undefined ? ([0, 0, 0] as Vec3) : r.point(content.eye, 'content.eye');
  const azimuthDeg = content.azimuth === undefined ? 0 : r.number(content.azimuth, 'content.azimuth', (x) => Math.abs(x) <= 1e6, 'an angle in degrees (the dome azimuth where the content\'s front is shown)');
  // any angle, kept in [0, 360): -90 and 270 are the same turn
  const azimuthNorm = ((azimuthDeg % 360) + 360) % 360;

  let name: string | undefined;
  if (doc.name !== undefined) {
    if (typeof doc.name !== 'string') throw new RigError('name', `expected text, got ${showValue(doc.name)}`);
    name = doc.name;
  }
  if (doc.notes !== undefined && typeof doc.notes !== 'string') throw new RigError('notes', `expected text, got ${showValue(doc.notes)}`);

  const room = roomFromDocument(doc, r);
  const rig: Rig = {
    units,
    name,
    dome: { radius: domeRadius, floor, mesh },
    mirror: { center, radius: mirrorRadius, axis, capAngle },
    projector: { position, lookAt, roll, up, resolution: [resV[0], resV[1]], throwRatio, lensShift, body, aperture, minFocus },
    content: { fov: fovDeg * DEG, eye, ...(azimuthNorm !== 0 ? { azimuth: azimuthNorm * DEG } : {}) },
    ...(room ? { room } : {}),
  };
  validateRigGeometry(rig);
  return rig;
}

/** What projector.aperture is, for its errors: a length, not an f-number. */
const APERTURE_MEANING = 'the diameter of the lens\'s entrance pupil, a length: its focal length divided by its f-number (a 20 mm lens at f/2: "10 mm"), not the f-number itself';
/** Wider than the entrance pupil of any projector lens (from memory: a few centimetres at most). */
const MAX_APERTURE = 0.2;

function apertureLength(r: FieldReader, v: unknown): number {
  if (typeof v === 'string' && /^\s*f\s*\/|^\s*f\s*\d/i.test(v)) throw new RigError('projector.aperture', `expected ${APERTURE_MEANING}; got ${showValue(v)}`);
  let metres: number;
  try {
    metres = r.length(v, 'projector.aperture', 'positive');
  } catch (e) {
    if (e instanceof RigError) throw new RigError('projector.aperture', `expected ${APERTURE_MEANING}; got ${showValue(v)}`);
    throw e;
  }
  if (metres > MAX_APERTURE) throw new RigError('projector.aperture', `${showValue(v)} is wider than any projector lens: expected ${APERTURE_MEANING}`);
  return metres;
}

function domeMeshFromDocument(dome: Doc, units: LengthUnit, options: RigDocumentOptions): DomeMesh | undefined {
  if (dome.mesh === undefined || dome.mesh === null) {
    if (dome.meshUnits !== undefined) throw new RigError('dome.meshUnits', 'is given without dome.mesh');
    return undefined;
  }
  if (typeof dome.mesh !== 'string' || dome.mesh.trim() === '') throw new RigError('dome.mesh', `expected the path of an OBJ, STL or PLY file, got ${showValue(dome.mesh)}`);
  const meshUnits = dome.meshUnits === undefined ? undefined : documentUnits({ units: dome.meshUnits }, 'dome.meshUnits');
  if (!options.loadMesh) throw new RigError('dome.mesh', `names the file ${showValue(dome.mesh)}, which only a caller that reads files can load`);
  const soup = options.loadMesh(dome.mesh);
  if (soup.indices.length / 3 > MAX_DOME_TRIANGLES) throw new RigError('dome.mesh', `more than ${MAX_DOME_TRIANGLES} triangles`);
  const k = METRES_PER_UNIT[meshUnits ?? units];
  const positions = new Float64Array(soup.positions.length);
  for (let i = 0; i < positions.length; i++) {
    const x = soup.positions[i] * k;
    if (!Number.isFinite(x) || Math.abs(x) > MAX_LENGTH) throw new RigError('dome.mesh', `vertex ${Math.floor(i / 3) + 1} lies beyond 10 km (or is not a number): check the mesh's units`);
    positions[i] = x;
  }
  return new DomeMesh(positions, soup.indices, { file: dome.mesh, units: meshUnits });
}

/**
 * Sphere radius of a cap from its rim width and depth — the sagitta relation r = (s² + (w/2)²) / (2s)
 * (handbook geometry).
 */
export function sagittaRadius(width: number, depth: number): number {
  return (depth * depth + (width / 2) * (width / 2)) / (2 * depth);
}

function round(x: number, digits: number): number {
  const v = Number(x.toFixed(digits));
  return Object.is(v, -0) ? 0 : v;
}

/**
 * A Rig → a rig document in the given units (numbers in those units, angles in degrees), the inverse of
 * `rigFromDocument` up to rounding to `digits` decimals of the unit.
 */
export function rigToDocument(rig: Rig, units: LengthUnit = rig.units, digits = 6): Doc {
  const L = (m: number) => round(fromMetres(m, units), digits);
  const P = (v: readonly number[]) => v.map((x) => L(x));
  const D = (v: readonly number[]) => v.map((x) => round(x, 9));
  const doc: Doc = { units };
  if (rig.name) doc.name = rig.name;
  doc.dome = { radius: L(rig.dome.radius), ...(rig.dome.floor !== undefined ? { floor: L(rig.dome.floor) } : {}) };
  const source = rig.dome.mesh?.source;
  if (source) Object.assign(doc.dome as Doc, { mesh: source.file, ...(source.units ? { meshUnits: source.units } : {}) });
  doc.mirror = { radius: L(rig.mirror.radius), center: P(rig.mirror.center), axis: D(rig.mirror.axis), capAngle: round(rig.mirror.capAngle * RAD, 9) };
  const p = rig.projector;
  const proj: Doc = {
    position: P(p.position),
    lookAt: P(p.lookAt),
    roll: round(p.roll * RAD, 9),
  };
  if (p.up) proj.up = D(p.up);
  proj.resolution = [...p.resolution];
  proj.throwRatio = round(p.throwRatio, 9);
  proj.lensShift = D(p.lensShift);
  if (p.body) proj.body = { width: L(p.body.width), length: L(p.body.length), height: L(p.body.height) };
  if (p.aperture !== undefined) proj.aperture = L(p.aperture);
  if (p.minFocus !== undefined) proj.minFocus = L(p.minFocus);
  doc.projector = proj;
  doc.content = { fov: round(rig.content.fov * RAD, 9), eye: P(rig.content.eye), ...(rig.content.azimuth ? { azimuth: round(rig.content.azimuth * RAD, 9) } : {}) };
  if (rig.room) doc.room = roomToDocument(rig.room, L);
  return doc;
}

function roomToDocument(room: RoomModel, L: (m: number) => number): Doc {
  const P = (v: readonly number[]) => v.map((x) => L(x));
  const out: Doc = {};
  const m = room.mirror;
  if (m) out.mirror = m.kind === 'fixed' || m.kind === 'edge' ? m.kind : m.kind === 'along' ? { along: [P(m.from), P(m.to)] } : { within: [P(m.min), P(m.max)] };
  if (room.lensHeight) out.lensHeight = P(room.lensHeight);
  if (room.audience === null) out.audience = 'none';
  else if (room.audience) out.audience = { center: P(room.audience.center), radius: L(room.audience.radius), eyes: [...room.audience.eyes] };
  if (room.leastLit !== undefined) out.leastLit = room.leastLit;
  if (room.maxShadow !== undefined) out.maxShadow = room.maxShadow;
  return out;
}
