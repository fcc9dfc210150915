/**
 * Triangle files for `dome.mesh` (DESIGN.md "As-built domes"), parsed from bytes: Wavefront OBJ (`v` and
 * `f` lines, polygons fan-triangulated from their first vertex), STL (ASCII or binary) and PLY (ASCII or
 * binary little-endian; vertex x y z, face vertex_indices). Coordinates come back as written, in the
 * file's units. Every error says where: a line for text files, a byte offset or record for binary ones.
 */
import { MAX_DOME_TRIANGLES, type TriangleSoup } from './dome-mesh.js';

export type TriangleFileFormat = 'obj' | 'stl' | 'ply';

/** A file that is not a readable triangle mesh; `line` (1-based) when the trouble is on one. */
export class MeshFileError extends Error {
  constructor(readonly reason: string, readonly line?: number) {
    super(line !== undefined ? `line ${line}: ${reason}` : reason);
    this.name = 'MeshFileError';
  }
}

/** The format a file name says (by its extension), if any. */
export function triangleFileFormat(name: string): TriangleFileFormat | undefined {
  const m = /\.(obj|stl|ply)$/i.exec(name);
  return m ? (m[1].toLowerCase() as TriangleFileFormat) : undefined;
}

/** Parses a triangle file; the format from `name`'s extension. Throws MeshFileError. */
export function parseTriangleFile(bytes: Uint8Array, name: string): TriangleSoup {
  const format = triangleFileFormat(name);
  if (format === undefined) throw new MeshFileError('unknown mesh format (expected a file ending in .obj, .stl or .ply)');
  const soup = format === 'obj' ? parseObj(bytes) : format === 'stl' ? parseStl(bytes) : parsePly(bytes);
  if (soup.indices.length === 0) throw new MeshFileError('no triangles in the file');
  return soup;
}

class Growing {
  a: Float64Array;
  n = 0;
  constructor(size = 1024) {
    this.a = new Float64Array(size);
  }
  push(x: number): void {
    if (this.n === this.a.length) {
      const b = new Float64Array(this.a.length * 2);
      b.set(this.a);
      this.a = b;
    }
    this.a[this.n++] = x;
  }
  done(): Float64Array {
    return this.a.slice(0, this.n);
  }
}

class GrowingIndex {
  a: Uint32Array;
  n = 0;
  constructor(size = 1024) {
    this.a = new Uint32Array(size);
  }
  push(x: number): void {
    if (this.n === this.a.length) {
      const b = new Uint32Array(this.a.length * 2);
      b.set(this.a);
      this.a = b;
    }
    this.a[this.n++] = x;
  }
  done(): Uint32Array {
    return this.a.slice(0, this.n);
  }
}

function decodeText(bytes: Uint8Array): string {
  return new TextDecoder('utf-8', { fatal: false }).decode(bytes);
}

function tooMany(line?: number): MeshFileError {
  return new MeshFileError(`more than ${MAX_DOME_TRIANGLES.toLocaleString('en')} triangles (the most a dome mesh may have)`, line);
}

function finite(text: string, what: string, line: number): number {
  const x = Number(text);
  if (text === undefined || text === '' || !Number.isFinite(x)) throw new MeshFileError(`expected a finite number for ${what}, got ${JSON.stringify((text ?? '').slice(0, 20))}`, line);
  return x;
}

// ——— OBJ ———

function parseObj(bytes: Uint8Array): TriangleSoup {
  const text = decodeText(bytes);
  const pos = new Growing();
  const idx = new GrowingIndex();
  let vertices = 0;
  let lineNo = 0;
  let start = 0;
  const corner: number[] = [];
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end < 0) end = text.length;
    lineNo++;
    const line = text.slice(start, end).trim();
    start = end + 1;
    if (line === '' || line[0] === '#') continue;
    const words = line.split(/\s+/);
    if (words[0] === 'v') {
      if (words.length < 4) throw new MeshFileError(`a vertex needs x y z, got ${JSON.stringify(line.slice(0, 40))}`, lineNo);
      pos.push(finite(words[1], 'x', lineNo));
      pos.push(finite(words[2], 'y', lineNo));
      pos.push(finite(words[3], 'z', lineNo));
      vertices++;
    } else if (words[0] === 'f') {
      if (words.length < 4) throw new MeshFileError(`a face needs at least three vertices, got ${JSON.stringify(line.slice(0, 40))}`, lineNo);
      corner.length = 0;
      for (let w = 1; w < words.length; w++) {
        const ref = words[w].split('/')[0];
        if (!/^-?\d+$/.test(ref)) throw new MeshFileError(`expected a vertex number, got ${JSON.stringify(words[w].slice(0, 20))}`, lineNo);
        const r = Number(ref);
        // 1-based; negative counts back from the latest vertex (the OBJ specification)
        const i = r > 0 ? r - 1 : vertices + r;
        if (r === 0 || i < 0 || i >= vertices) throw new MeshFileError(`vertex ${r} is out of range (${vertices} vertices so far)`, lineNo);
        corner.push(i);
      }
      for (let c = 1; c + 1 < corner.length; c++) {
        if (idx.n / 3 >= MAX_DOME_TRIANGLES) throw tooMany(lineNo);
        idx.push(corner[0]);
        idx.push(corner[c]);
        idx.push(corner[c + 1]);
      }
    }
    // other lines (vn, vt, o, g, usemtl, s, l ...) carry nothing a dome surface needs
  }
  return { positions: pos.done(), indices: idx.done() };
}

// ——— STL ———

function parseStl(bytes: Uint8Array): TriangleSoup {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const binarySize = bytes.length >= 84 ? 84 + 50 * dv.getUint32(80, true) : -1;
  const head = decodeText(bytes.subarray(0, Math.min(bytes.length, 512))).trimStart();
  const looksAscii = head.toLowerCase().startsWith('solid') && bytes.length !== binarySize;
  if (looksAscii) return parseStlAscii(bytes);
  if (bytes.length < 84) throw new MeshFileError(`truncated binary STL: ${bytes.length} bytes, less than its 84-byte header`);
  const n = dv.getUint32(80, true);
  if (n > MAX_DOME_TRIANGLES) throw tooMany();
  if (bytes.length < binarySize) throw new MeshFileError(`truncated binary STL: the header says ${n} triangles (${binarySize} bytes), the file has ${bytes.length} bytes`);
  const positions = new Float64Array(9 * n);
  const indices = new Uint32Array(3 * n);
  for (let t = 0; t < n; t++) {
    const o = 84 + 50 * t + 12; // skip the facet normal
    for (let c = 0; c < 9; c++) {
      const x = dv.getFloat32(o + 4 * c, true);
      if (!Number.isFinite(x)) throw new MeshFileError(`triangle ${t + 1} (byte ${o + 4 * c}): a coordinate is not a finite number`);
      positions[9 * t + c] = x;
    }
    indices[3 * t] = 3 * t;
    indices[3 * t + 1] = 3 * t + 1;
    indices[3 * t + 2] = 3 * t + 2;
  }
  return { positions, indices };
}

function parseStlAscii(bytes: Uint8Array): TriangleSoup {
  const lines = decodeText(bytes).split('\n');
  const pos = new Growing();
  let inLoop = 0;
  let loopLine = 0;
  let triangles = 0;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i].trim();
    if (line === '') continue;
    const words = line.split(/\s+/);
    const key = words[0].toLowerCase();
    if (key === 'vertex') {
      if (loopLine === 0) throw new MeshFileError('a vertex outside "outer loop"', i + 1);
      if (words.length < 4) throw new MeshFileError(`a vertex needs x y z, got ${JSON.stringify(line.slice(0, 40))}`, i + 1);
      if (inLoop === 3) throw new MeshFileError('a facet with more than three vertices', i + 1);
      pos.push(finite(words[1], 'x', i + 1));
      pos.push(finite(words[2], 'y', i + 1));
      pos.push(finite(words[3], 'z', i + 1));
      inLoop++;
    } else if (key === 'outer') {
      inLoop = 0;
      loopLine = i + 1;
    } else if (key === 'endloop') {
      if (inLoop !== 3) throw new MeshFileError(`a facet with ${inLoop} vertices (expected 3)`, i + 1);
      if (++triangles > MAX_DOME_TRIANGLES) throw tooMany(i + 1);
      loopLine = 0;
      inLoop = 0;
    } else if (key !== 'solid' && key !== 'facet' && key !== 'endfacet' && key !== 'endsolid') {
      throw new MeshFileError(`not an ASCII STL line: ${JSON.stringify(line.slice(0, 40))}`, i + 1);
    }
  }
  if (loopLine !== 0) throw new MeshFileError('the file ends inside a facet (truncated?)', loopLine);
  const positions = pos.done();
  const indices = new Uint32Array(3 * triangles);
  for (let k = 0; k < indices.length; k++) indices[k] = k;
  return { positions, indices };
}

// ——— PLY ———

type PlyType = 'int8' | 'uint8' | 'int16' | 'uint16' | 'int32' | 'uint32' | 'float32' | 'float64';
const PLY_TYPES: Record<string, PlyType> = {
  char: 'int8', int8: 'int8', uchar: 'uint8', uint8: 'uint8', short: 'int16', int16: 'int16', ushort: 'uint16', uint16: 'uint16',
  int: 'int32', int32: 'int32', uint: 'uint32', uint32: 'uint32', float: 'float32', float32: 'float32', double: 'float64', float64: 'float64',
};
const PLY_SIZE: Record<PlyType, number> = { int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4, float32: 4, float64: 8 };

interface PlyProperty {
  name: string;
  type: PlyType;
  /** For a list property, the type of its count. */
  countType?: PlyType;
}
interface PlyElement {
  name: string;
  count: number;
  properties: PlyProperty[];
  line: number;
}

function readPly(dv: DataView, o: number, t: PlyType): number {
  switch (t) {
    case 'int8': return dv.getInt8(o);
    case 'uint8': return dv.getUint8(o);
    case 'int16': return dv.getInt16(o, true);
    case 'uint16': return dv.getUint16(o, true);
    case 'int32': return dv.getInt32(o, true);
    case 'uint32': return dv.getUint32(o, true);
    case 'float32': return dv.getFloat32(o, true);
    case 'float64': return dv.getFloat64(o, true);
  }
}

function parsePly(bytes: Uint8Array): TriangleSoup {
  // the header is ASCII up to and including "end_header\n"
  const probe = decodeText(bytes.subarray(0, Math.min(bytes.length, 65536)));
  const endAt = probe.search(/end_header\r?\n/);
  if (!probe.startsWith('ply')) throw new MeshFileError('not a PLY file (it does not start with "ply")', 1);
  if (endAt < 0) throw new MeshFileError('the PLY header has no "end_header" line (truncated?)');
  const headerText = probe.slice(0, endAt);
  const bodyStart = endAt + /end_header\r?\n/.exec(probe.slice(endAt))![0].length;
  const headerLines = headerText.split(/\r?\n/);
  let format = '';
  const elements: PlyElement[] = [];
  headerLines.forEach((raw, i) => {
    const line = raw.trim();
    const w = line.split(/\s+/);
    if (i === 0 || line === '' || w[0] === 'comment' || w[0] === 'obj_info') return;
    if (w[0] === 'format') {
      format = w[1];
      if (format !== 'ascii' && format !== 'binary_little_endian') {
        throw new MeshFileError(`PLY format ${JSON.stringify(w[1] ?? '')} is not read (expected ascii or binary_little_endian)`, i + 1);
      }
    } else if (w[0] === 'element') {
      const count = Number(w[2]);
      if (w.length < 3 || !Number.isInteger(count) || count < 0) throw new MeshFileError(`expected "element NAME COUNT", got ${JSON.stringify(line.slice(0, 40))}`, i + 1);
      elements.push({ name: w[1], count, properties: [], line: i + 1 });
    } else if (w[0] === 'property') {
      const el = elements[elements.length - 1];
      if (!el) throw new MeshFileError('a property before any element', i + 1);
      if (w[1] === 'list') {
        const countType = PLY_TYPES[w[2]];
        const type = PLY_TYPES[w[3]];
        if (!countType || !type || w.length < 5) throw new MeshFileError(`expected "property list COUNT-TYPE TYPE NAME", got ${JSON.stringify(line.slice(0, 50))}`, i + 1);
        el.properties.push({ name: w[4], type, countType });
      } else {
        const type = PLY_TYPES[w[1]];
        if (!type || w.length < 3) throw new MeshFileError(`expected "property TYPE NAME", got ${JSON.stringify(line.slice(0, 50))}`, i + 1);
        el.properties.push({ name: w[2], type });
      }
    } else {
      throw new MeshFileError(`not a PLY header line: ${JSON.stringify(line.slice(0, 40))}`, i + 1);
    }
  });
  if (format === '') throw new MeshFileError('the PLY header has no "format" line');
  const vertexEl = elements.find((e) => e.name === 'vertex');
  const faceEl = elements.find((e) => e.name === 'face');
  if (!vertexEl) throw new MeshFileError('the PLY header has no vertex element');
  if (!faceEl) throw new MeshFileError('no triangles in the file (the PLY header has no face element)');
  const axes = ['x', 'y', 'z'].map((a) => vertexEl.properties.findIndex((p) => p.name === a && !p.countType));
  if (axes.some((a) => a < 0)) throw new MeshFileError('the PLY vertex element needs properties x, y and z', vertexEl.line);
  const listAt = faceEl.properties.findIndex((p) => (p.name === 'vertex_indices' || p.name === 'vertex_index') && p.countType);
  if (listAt < 0) throw new MeshFileError('the PLY face element needs a list property vertex_indices', faceEl.line);

  const nv = vertexEl.count;
  const positions = new Float64Array(3 * nv);
  const idx = new GrowingIndex();
  const headerLineCount = headerLines.length + 1;

  const addFace = (corner: number[], line: number | undefined, face: number) => {
    const which = line === undefined ? `face ${face + 1}: ` : '';
    if (corner.length < 3) throw new MeshFileError(`${which}a face with ${corner.length} vertices (expected at least 3)`, line);
    for (const c of corner) {
      if (!(Number.isInteger(c) && c >= 0 && c < nv)) throw new MeshFileError(`${which}vertex index ${c} is out of range (the file has ${nv} vertices)`, line);
    }
    for (let c = 1; c + 1 < corner.length; c++) {
      if (idx.n / 3 >= MAX_DOME_TRIANGLES) throw tooMany(line);
      idx.push(corner[0]);
      idx.push(corner[c]);
      idx.push(corner[c + 1]);
    }
  };

  if (format === 'ascii') {
    const lines = decodeText(bytes.subarray(bodyStart)).split('\n');
    let li = 0;
    const nextLine = (): [string[], number] => {
      while (li < lines.length && lines[li].trim() === '') li++;
      if (li >= lines.length) throw new MeshFileError('the file ends before all the elements its header announces (truncated?)', headerLineCount + li);
      const w = lines[li].trim().split(/\s+/);
      li++;
      return [w, headerLineCount + li - 1];
    };
    for (const el of elements) {
      for (let r = 0; r < el.count; r++) {
        const [w, lineNo] = nextLine();
        let at = 0;
        const corner: number[] = [];
        for (let p = 0; p < el.properties.length; p++) {
          const prop = el.properties[p];
          if (prop.countType) {
            const c = finite(w[at++], `the count of ${prop.name}`, lineNo);
            const vals: number[] = [];
            for (let q = 0; q < c; q++) vals.push(finite(w[at++], prop.name, lineNo));
            if (el === faceEl && p === listAt) for (const v of vals) corner.push(v);
          } else {
            const x = finite(w[at++], prop.name, lineNo);
            if (el === vertexEl) {
              const a = axes.indexOf(p);
              if (a >= 0) positions[3 * r + a] = x;
            }
          }
        }
        if (el === faceEl) addFace(corner, lineNo, r);
      }
    }
  } else {
    const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    let o = bodyStart;
    const need = (n: number, el: PlyElement, r: number) => {
      if (o + n > bytes.length) throw new MeshFileError(`the file ends inside ${el.name} ${r + 1} of ${el.count} (byte ${o}; truncated?)`);
    };
    for (const el of elements) {
      for (let r = 0; r < el.count; r++) {
        const corner: number[] = [];
        for (let p = 0; p < el.properties.length; p++) {
          const prop = el.properties[p];
          if (prop.countType) {
            need(PLY_SIZE[prop.countType], el, r);
            const c = readPly(dv, o, prop.countType);
            o += PLY_SIZE[prop.countType];
            need(c * PLY_SIZE[prop.type], el, r);
            for (let q = 0; q < c; q++) {
              const x = readPly(dv, o, prop.type);
              o += PLY_SIZE[prop.type];
              if (el === faceEl && p === listAt) corner.push(x);
            }
          } else {
            need(PLY_SIZE[prop.type], el, r);
            const x = readPly(dv, o, prop.type);
            o += PLY_SIZE[prop.type];
            if (el === vertexEl) {
              const a = axes.indexOf(p);
              if (a >= 0) {
                if (!Number.isFinite(x)) throw new MeshFileError(`vertex ${r + 1}: ${prop.name} is not a finite number (byte ${o - PLY_SIZE[prop.type]})`);
                positions[3 * r + a] = x;
              }
            }
          }
        }
        if (el === faceEl) addFace(corner, undefined, r);
      }
    }
  }
  return { positions, indices: idx.done() };
}
