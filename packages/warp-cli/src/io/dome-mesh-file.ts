/** Reads the triangle file a rig's `dome.mesh` names, relative to the rig file's folder. */
import { readFileSync, statSync } from 'node:fs';
import { dirname, isAbsolute, join } from 'node:path';
import { MeshFileError, parseTriangleFile, shortQuote, type TriangleSoup } from '@skyfold/warp-core';
import { UserError } from '../errors.js';

/** Larger than any mesh of the bounded triangle count (2 million binary STL triangles are 100 MB). */
const MAX_MESH_BYTES = 512 * 2 ** 20;

/** The path a rig file's `dome.mesh` stands for. */
export function domeMeshPath(rigPath: string, file: string): string {
  return isAbsolute(file) ? file : join(dirname(rigPath), file);
}

/** Reads and parses the mesh; every failure is a one-line UserError naming the file (and line). */
export function readDomeMesh(rigPath: string, file: string): TriangleSoup {
  const path = domeMeshPath(rigPath, file);
  // a name longer than any file system allows is said short, never quoted whole (issue 10)
  if (file.length > 255) throw new UserError(`${rigPath}: dome.mesh: ${shortQuote(file)} is ${file.length} characters long, too long for a file name`);
  let bytes: Buffer;
  try {
    const size = statSync(path).size;
    if (size > MAX_MESH_BYTES) throw new UserError(`${path}: the dome mesh is ${(size / 2 ** 20).toFixed(0)} MB, more than the ${MAX_MESH_BYTES / 2 ** 20} MB a mesh of 2 million triangles needs (dome.mesh in ${rigPath})`);
    bytes = readFileSync(path);
  } catch (e) {
    if (e instanceof UserError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
    throw new UserError(`${path}: cannot read the dome mesh: ${why} (dome.mesh in ${rigPath})`);
  }
  try {
    return parseTriangleFile(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), path);
  } catch (e) {
    if (e instanceof MeshFileError) throw new UserError(`${path}: ${e.message} (dome.mesh in ${rigPath})`);
    throw e;
  }
}
