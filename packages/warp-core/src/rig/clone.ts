/**
 * A deep copy of a rig: every vector and tuple is new, so writing into the copy never touches the
 * original. The as-built dome mesh is shared: it is built once and never written after.
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';
import type { Rig } from './model.js';

function copy3(a: ReadonlyVec3): Vec3 {
  return [a[0], a[1], a[2]];
}

export function cloneRig(rig: Rig): Rig {
  const p = rig.projector;
  return {
    ...rig,
    dome: { ...rig.dome },
    mirror: { ...rig.mirror, center: copy3(rig.mirror.center), axis: copy3(rig.mirror.axis) },
    projector: {
      ...p,
      position: copy3(p.position),
      lookAt: copy3(p.lookAt),
      up: p.up ? copy3(p.up) : undefined,
      resolution: [p.resolution[0], p.resolution[1]],
      lensShift: [p.lensShift[0], p.lensShift[1]],
      body: p.body ? { ...p.body } : undefined,
    },
    content: { ...rig.content, eye: copy3(rig.content.eye) },
    ...(rig.room ? { room: structuredClone(rig.room) } : {}),
  };
}
