/**
 * The rig: dome, projector, mirror and content, in metres and radians (DESIGN.md "Frames and units").
 * Rig files speak degrees and the file's units; `rig-document.ts` converts at that boundary.
 */
import { cross, DEG, dot, length, normalize, safeAcos, scale, sub, type ReadonlyVec3, type Vec3 } from '../math.js';
import { quat, vec3 } from 'gl-matrix';
import { formatLength, type LengthUnit } from '../units.js';
import type { DomeMesh } from '../optics/dome-mesh.js';

export interface DomeModel {
  /** Radius of the dome sphere, centred on the world origin. */
  radius: number;
  /** How far the floor lies below the springline (positive), if known. */
  floor?: number;
  /** The dome as built (DESIGN.md "As-built domes"); `radius` stays the nominal sphere. */
  mesh?: DomeMesh;
}

export interface MirrorModel {
  center: Vec3;
  radius: number;
  /** Unit vector out of the reflective face. */
  axis: Vec3;
  /** Half-angle of the reflective cap, radians (π/2 = hemisphere). */
  capAngle: number;
}

/** The projector's body as a box behind the lens, aligned with its axes (lens at the front face's centre). */
export interface ProjectorBody {
  width: number;
  length: number;
  height: number;
}

export interface ProjectorModel {
  /** The lens: centre of projection. */
  position: Vec3;
  /** Any point on the optical axis. */
  lookAt: Vec3;
  /** Radians, right-hand rule about forward. */
  roll: number;
  /** Replaces world +z as the starting up; needed for a vertical optical axis. */
  up?: Vec3;
  resolution: [number, number];
  throwRatio: number;
  /** Image-centre offset in fractions of width and height; +y moves the picture up. */
  lensShift: [number, number];
  body?: ProjectorBody;
  /** Lens aperture diameter (entrance pupil), for focus blur estimates. */
  aperture?: number;
  /** Nearest distance the lens can focus at. */
  minFocus?: number;
}

export interface ContentModel {
  /** Full field of view of the dome master, radians (π = a hemisphere down to the horizon). */
  fov: number;
  /** Point the content is mapped for. */
  eye: Vec3;
  /**
   * Dome azimuth (radians, clockwise seen from below: 0 front, π/2 right) at which the content's front —
   * the bottom of the dome master — is shown; 0 or absent: at the dome's front.
   */
  azimuth?: number;
}

/** Where the planner may put the mirror's centre. */
export type MirrorPlace =
  | { kind: 'fixed' }
  /** No nearer the dome's axis (horizontally) than EDGE_SHARE of the dome radius: the middle stays free. */
  | { kind: 'edge' }
  | { kind: 'along'; from: Vec3; to: Vec3 }
  | { kind: 'within'; min: Vec3; max: Vec3 };

/** The eye-height bands of the report's safety figures (`analysis/safety.ts` EYE_BANDS). */
export type EyeBandName = 'floor-seated' | 'seated' | 'standing';

/** The audience's part of the floor: a circle seen from above. */
export interface AudienceZone {
  center: [number, number];
  radius: number;
  /** Eye heights the beam between lens and mirror must stay clear of over the zone. */
  eyes: EyeBandName[];
}

/** The room as the planner must respect it (rig section `room`; every field optional). */
export interface RoomModel {
  mirror?: MirrorPlace;
  /** Lowest and highest lens height above the floor (a table, a stand). */
  lensHeight?: [number, number];
  /** The audience's circle; null: no audience zone at all. */
  audience?: AudienceZone | null;
  /** Least share of the projector's pixels that must light the content. */
  leastLit?: number;
  /** Largest share of the content's dome the projector's body may hide. */
  maxShadow?: number;
}

export interface Rig {
  /** The units the rig file used; output in a person's units follows it. */
  units: LengthUnit;
  name?: string;
  dome: DomeModel;
  mirror: MirrorModel;
  projector: ProjectorModel;
  content: ContentModel;
  /** Only the planner reads it. */
  room?: RoomModel;
}

/**
 * Most pixels a projector has on a side: 8K (8192) is beyond any projector made today (from memory:
 * the largest are 8K UHD, 7680 × 4320), and the trace, the mesh and the frames stay within memory.
 */
export const MAX_PROJECTOR_SIDE = 8192;

/** A rig that cannot work, or a field that is wrong; `field` is the dotted path ("mirror.radius"). */
export class RigError extends Error {
  constructor(readonly field: string, readonly reason: string) {
    super(field ? `${field}: ${reason}` : reason);
    this.name = 'RigError';
  }
}

/** An option of a core call that cannot work; `option` is its name in the options object ("vary"). */
export class OptionError extends RigError {
  constructor(readonly option: string, reason: string) {
    super(option, reason);
    this.name = 'OptionError';
  }
}

export interface ProjectorBasis {
  forward: Vec3;
  right: Vec3;
  up: Vec3;
}

/**
 * forward = normalize(lookAt − position); up = the starting up made orthogonal to forward, then turned
 * about forward by roll (right-hand rule); right = forward × up (DESIGN.md "Projector model").
 * Built once per rig with gl-matrix (out-first, into plain number arrays: gl-matrix's own create()
 * would give Float32Array).
 */
export function projectorBasis(p: Pick<ProjectorModel, 'position' | 'lookAt' | 'roll' | 'up'>): ProjectorBasis {
  const forward: Vec3 = [0, 0, 0];
  vec3.subtract(forward, p.lookAt, p.position);
  if (vec3.length(forward) < 1e-12) throw new RigError('projector.lookAt', 'must differ from projector.position');
  vec3.normalize(forward, forward);
  const start: ReadonlyVec3 = p.up ?? [0, 0, 1];
  // right from a cross product, then up = right × forward: orthonormal even a hair off vertical
  const right: Vec3 = [0, 0, 0];
  vec3.cross(right, forward, start);
  if (vec3.length(right) < 1e-9 * Math.max(1, vec3.length(start))) {
    throw new RigError(
      p.up ? 'projector.up' : 'projector.lookAt',
      p.up ? 'must not be parallel to the optical axis' : 'the optical axis is vertical: give projector.up to say which way the picture is up',
    );
  }
  vec3.normalize(right, right);
  const up: Vec3 = [0, 0, 0];
  vec3.cross(up, right, forward);
  // the roll: a turn of up about forward by the roll angle (right-hand rule), as a unit quaternion
  const turn = quat.setAxisAngle([0, 0, 0, 1], forward, p.roll);
  vec3.normalize(up, vec3.transformQuat(up, up, turn));
  vec3.cross(right, forward, up);
  return { forward, right, up };
}

/** The mirror's pole: the cap's apex, center + radius·axis. */
export function mirrorPole(m: MirrorModel): Vec3 {
  return vec3.scaleAndAdd([0, 0, 0], m.center, m.axis, m.radius) as Vec3;
}

/** Largest distance from the dome centre of any point of the mirror's reflective cap. */
export function capFarthestDistance(m: MirrorModel): number {
  const cl = length(m.center);
  if (cl < 1e-15) return m.radius;
  const angleToCenterDir = safeAcos(dot(m.axis, m.center) / cl);
  const gap = Math.max(0, angleToCenterDir - m.capAngle);
  // |C + r·m|² = |C|² + r² + 2r C·m, largest where m is nearest the direction of C within the cap.
  return Math.sqrt(cl * cl + m.radius * m.radius + 2 * m.radius * cl * Math.cos(gap));
}

/**
 * Geometry that cannot work is refused with a reason (throws RigError). Field-level checks (positive
 * lengths, ranges) live in the document parser; this holds the relations between parts, so that rigs
 * made by the fit or the planner are checked the same way.
 */
export function validateRigGeometry(rig: Rig): void {
  const R = rig.dome.radius;
  const { mirror, projector, content } = rig;
  const L = (m: number) => formatLength(m, rig.units);
  if (!(R > 0)) throw new RigError('dome.radius', 'expected a positive length');
  if (!(mirror.radius > 0)) throw new RigError('mirror.radius', 'expected a positive length');
  if (!(mirror.capAngle > 0 && mirror.capAngle <= Math.PI)) throw new RigError('mirror.capAngle', 'expected an angle in (0, 180] degrees');
  const far = capFarthestDistance(mirror);
  if (!(far < R)) {
    throw new RigError('mirror.center', `the mirror is not inside the dome (its cap reaches ${L(far)} from the dome centre; the dome radius is ${L(R)})`);
  }
  const pd = length(projector.position);
  if (!(pd < R)) throw new RigError('projector.position', `the projector is outside the dome (${L(pd)} from the centre; the dome radius is ${L(R)})`);
  const pm = length(sub(projector.position, mirror.center));
  if (!(pm > mirror.radius)) throw new RigError('projector.position', 'the projector is inside the mirror sphere');
  const [w, h] = projector.resolution;
  if (!(Number.isInteger(w) && w > 0 && Number.isInteger(h) && h > 0)) throw new RigError('projector.resolution', 'expected two positive whole numbers');
  if (w > MAX_PROJECTOR_SIDE || h > MAX_PROJECTOR_SIDE) throw new RigError('projector.resolution', `expected at most ${MAX_PROJECTOR_SIDE} pixels a side (8K is beyond any projector)`);
  if (!(projector.throwRatio > 0)) throw new RigError('projector.throwRatio', 'expected a positive number');
  projectorBasis(projector);
  if (!(content.fov > 0 && content.fov <= 2 * Math.PI)) throw new RigError('content.fov', 'expected an angle in (0, 360] degrees');
  if (!(length(content.eye) < R)) throw new RigError('content.eye', 'the eye point must be inside the dome');
  if (rig.dome.floor !== undefined && !(rig.dome.floor > 0)) throw new RigError('dome.floor', 'expected a positive length');
  if (rig.dome.floor !== undefined) validateAboveFloor(rig, rig.dome.floor);
}

/** Parts may rest on the floor; rounding a hair below it (a nanometre) is not a rig mistake. */
const FLOOR_TOLERANCE = 1e-9;

/** Lowest height (z) of any point of the mirror's reflective cap. */
export function capLowestZ(m: MirrorModel): number {
  // the cap's point nearest straight down: the nadir itself when the cap holds it, else the rim toward it
  const fromNadir = safeAcos(-m.axis[2]);
  const lowest = fromNadir <= m.capAngle ? -1 : -Math.cos(fromNadir - m.capAngle);
  return m.center[2] + m.radius * lowest;
}

/** Lowest height (z) of the projector's body box (lens at the front face's centre, DESIGN.md rig `projector.body`). */
export function bodyLowestZ(p: ProjectorModel, body: ProjectorBody): number {
  const { forward, right, up } = projectorBasis(p);
  return p.position[2] - (Math.abs(right[2]) * body.width) / 2 - (Math.abs(up[2]) * body.height) / 2 + Math.min(0, -body.length * forward[2]);
}

/** The floor is real: nothing of the rig may stand below it (`floor` metres under the springline). */
function validateAboveFloor(rig: Rig, floor: number): void {
  const L = (m: number) => formatLength(m, rig.units);
  const under = (z: number) => -floor - z;
  const where = `dome.floor puts the floor ${L(floor)} below the springline`;
  const mirrorUnder = under(capLowestZ(rig.mirror));
  if (mirrorUnder > FLOOR_TOLERANCE) throw new RigError('mirror', `the mirror reaches ${L(mirrorUnder)} below the floor (${where}): raise the mirror or check dome.floor`);
  const p = rig.projector;
  const lensUnder = under(p.position[2]);
  if (lensUnder > FLOOR_TOLERANCE) throw new RigError('projector.position', `the projector's lens is ${L(lensUnder)} below the floor (${where}): raise the projector or check dome.floor`);
  if (p.body) {
    const bodyUnder = under(bodyLowestZ(p, p.body));
    if (bodyUnder > FLOOR_TOLERANCE) throw new RigError('projector.body', `the projector's body reaches ${L(bodyUnder)} below the floor (${where}): raise the projector, tilt it less, or check dome.floor`);
  }
}

/** Degrees helper for building rigs in code. */
export function deg(d: number): number {
  return d * DEG;
}
