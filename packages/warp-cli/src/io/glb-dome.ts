/**
 * The as-built dome's triangles a skyfold .glb carries (export/glb.ts: the mesh `as-built-dome`,
 * POSITION in metres in the world frame, on a node outside the scene), read straight from the
 * binary glTF so that loading a rig from a .glb stays synchronous and needs no file beside it.
 *
 * Khronos glTF 2.0: Sec. 4.4 (GLB: a 12-byte header, a JSON chunk, a BIN chunk of type 0x004E4942),
 * Sec. 3.6.2 (accessors: bufferView, byteOffset, componentType 5126 FLOAT, 5123 UNSIGNED_SHORT,
 * 5125 UNSIGNED_INT, count, type) and Sec. 3.6.1 (buffer views: byteOffset, byteLength, byteStride).
 */
import type { TriangleSoup } from '@skyfold/warp-core';

const JSON_CHUNK = 0x4e4f534a;
const BIN_CHUNK = 0x004e4942;

interface Accessor {
  bufferView?: number;
  byteOffset?: number;
  componentType?: number;
  count?: number;
  type?: string;
}
interface BufferView {
  buffer?: number;
  byteOffset?: number;
  byteLength?: number;
  byteStride?: number;
}
interface GltfJson {
  meshes?: { name?: string; primitives?: { attributes?: Record<string, number>; indices?: number }[] }[];
  accessors?: Accessor[];
  bufferViews?: BufferView[];
}

/**
 * The triangles of the mesh named `name` in a binary glTF, positions as stored (metres for skyfold's
 * dome), or undefined when there is no such mesh; throws an Error saying what is wrong with it otherwise.
 */
export function glbTriangles(bytes: Uint8Array, name: string): TriangleSoup | undefined {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.length < 20 || dv.getUint32(0, true) !== 0x46546c67 || dv.getUint32(16, true) !== JSON_CHUNK) throw new Error('not a binary glTF file');
  const jsonLength = dv.getUint32(12, true);
  if (20 + jsonLength > bytes.length) throw new Error('its JSON chunk runs past the end');
  const json = JSON.parse(new TextDecoder().decode(bytes.subarray(20, 20 + jsonLength))) as GltfJson;
  const mesh = json.meshes?.find((m) => m?.name === name);
  if (!mesh) return undefined;
  const prim = mesh.primitives?.[0];
  const position = prim?.attributes?.POSITION;
  if (prim === undefined || position === undefined || prim.indices === undefined) throw new Error(`the mesh ${name} has no indexed triangle primitive`);
  const binAt = 20 + jsonLength;
  if (binAt + 8 > bytes.length || dv.getUint32(binAt + 4, true) !== BIN_CHUNK) throw new Error('it has no binary chunk');
  const binLength = dv.getUint32(binAt, true);
  const bin = binAt + 8;
  if (bin + binLength > bytes.length) throw new Error('its binary chunk runs past the end');

  /** The accessor's elements as numbers, `size` per element, after checking they lie inside the binary chunk. */
  const read = (index: number, size: number, types: readonly number[]): Float64Array => {
    const a = json.accessors?.[index];
    const view = a?.bufferView === undefined ? undefined : json.bufferViews?.[a.bufferView];
    if (!a || !view || !types.includes(a.componentType ?? -1) || !Number.isInteger(a.count) || a.count! < 0 || (view.buffer ?? 0) !== 0) {
      throw new Error(`accessor ${index} of the mesh ${name} is not one skyfold writes`);
    }
    const bytesPer = a.componentType === 5123 ? 2 : 4;
    const stride = view.byteStride ?? size * bytesPer;
    const start = (view.byteOffset ?? 0) + (a.byteOffset ?? 0);
    const count = a.count!;
    const end = count === 0 ? start : start + (count - 1) * stride + size * bytesPer;
    if (end > (view.byteOffset ?? 0) + (view.byteLength ?? 0) || end > binLength) throw new Error(`accessor ${index} of the mesh ${name} runs past its data`);
    const out = new Float64Array(count * size);
    for (let e = 0; e < count; e++)
      for (let s = 0; s < size; s++) {
        const at = bin + start + e * stride + s * bytesPer;
        out[e * size + s] = a.componentType === 5126 ? dv.getFloat32(at, true) : a.componentType === 5123 ? dv.getUint16(at, true) : dv.getUint32(at, true);
      }
    return out;
  };
  const positions = read(position, 3, [5126]);
  const indices = read(prim.indices, 1, [5123, 5125]);
  const vertices = positions.length / 3;
  if (indices.length % 3 !== 0 || indices.some((i) => i >= vertices)) throw new Error(`the mesh ${name}'s indices are not whole triangles of its vertices`);
  return { positions, indices: Uint32Array.from(indices) };
}
