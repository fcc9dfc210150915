/** Reads YAML or JSON documents from disk with one-line errors that give line and column. */
import { closeSync, fstatSync, openSync, readSync, constants as fsConstants } from 'node:fs';
import { isMap, isScalar, isSeq, parseDocument, type Node as YamlNode } from 'yaml';
import { RigError, rigFromDocument, rigWarnings, shortQuote, type Rig, type TriangleSoup } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { warn } from '../messages.js';
import { readDomeMesh } from './dome-mesh-file.js';
import { glbTriangles } from './glb-dome.js';
import { GLB_DOME_NAME } from '../export/glb.js';

function lineCol(text: string, pos: number): [number, number] {
  let line = 1;
  let col = 1;
  for (let i = 0; i < pos && i < text.length; i++) {
    if (text[i] === '\n') {
      line++;
      col = 1;
    } else col++;
  }
  return [line, col];
}

/** Rig and measurement files are a few kilobytes; anything this large is the wrong file, refused before parsing. */
export const MAX_DOCUMENT_BYTES = 4 * 2 ** 20;
/** Deeper nesting than any rig has (a rig is three levels deep); it also keeps recursive consumers safe. */
export const MAX_DOCUMENT_DEPTH = 32;

function where(text: string, pos: number): string {
  const [l, c] = lineCol(text, pos);
  return `line ${l}, column ${c}: `;
}

/**
 * One linear pass over JSON text that JSON.parse has accepted: a key given twice in one object
 * (which JSON.parse silently resolves last-wins) and nesting deeper than MAX_DOCUMENT_DEPTH are refused.
 */
function checkJsonStructure(text: string, label: string): void {
  const stack: (Set<string> | null)[] = [];
  let expectKey = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 0x22) {
      let j = i + 1;
      while (j < text.length && text.charCodeAt(j) !== 0x22) j += text.charCodeAt(j) === 0x5c ? 2 : 1;
      const top = stack[stack.length - 1];
      if (top && expectKey) {
        const key = JSON.parse(text.slice(i, j + 1)) as string;
        if (top.has(key)) throw new UserError(`${label}: ${where(text, i)}the key ${shortQuote(key)} appears twice in one object`);
        top.add(key);
        expectKey = false;
      }
      i = j;
    } else if (c === 0x7b || c === 0x5b) {
      stack.push(c === 0x7b ? new Set() : null);
      expectKey = c === 0x7b;
      if (stack.length > MAX_DOCUMENT_DEPTH) throw new UserError(`${label}: ${where(text, i)}nested more than ${MAX_DOCUMENT_DEPTH} levels deep`);
    } else if (c === 0x7d || c === 0x5d) {
      stack.pop();
      expectKey = false;
    } else if (c === 0x2c) {
      expectKey = stack[stack.length - 1] instanceof Set;
    }
  }
}

/** One pass over the YAML nodes (each visited once, aliases not followed): duplicate keys and depth. */
function checkYamlStructure(root: YamlNode | null, text: string, label: string): void {
  const stack: [YamlNode, number][] = root ? [[root, 1]] : [];
  while (stack.length > 0) {
    const [node, depth] = stack.pop()!;
    if (depth > MAX_DOCUMENT_DEPTH) throw new UserError(`${label}: ${where(text, node.range?.[0] ?? 0)}nested more than ${MAX_DOCUMENT_DEPTH} levels deep`);
    if (isMap(node)) {
      const seen = new Set<unknown>();
      for (const pair of node.items) {
        const k = pair.key as YamlNode | null;
        const key = isScalar(k) ? k.value : k ? String(k) : null;
        if (seen.has(key)) throw new UserError(`${label}: ${where(text, k?.range?.[0] ?? 0)}the key ${shortQuote(String(key))} appears twice in one mapping`);
        seen.add(key);
        if (pair.value && typeof pair.value === 'object') stack.push([pair.value as YamlNode, depth + 1]);
      }
    } else if (isSeq(node)) {
      for (const item of node.items) if (item && typeof item === 'object') stack.push([item as YamlNode, depth + 1]);
    }
  }
}

/** Parses a YAML (or, for .json files, JSON) document; syntax errors become UserErrors with line and column. */
export function parseDocumentText(text: string, label: string): unknown {
  if (text.length > MAX_DOCUMENT_BYTES) throw new UserError(`${label}: ${(text.length / 2 ** 20).toFixed(1)} MB is far larger than a rig or measurement file (at most ${MAX_DOCUMENT_BYTES / 2 ** 20} MB)`);
  if (label.toLowerCase().endsWith('.json')) {
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch (e) {
      const msg = (e as Error).message;
      const m = /position (\d+)/.exec(msg);
      const at = m ? where(text, Number(m[1])) : '';
      throw new UserError(`${label}: ${at}JSON syntax error: ${clip(msg.split('\n')[0])}`);
    }
    checkJsonStructure(text, label);
    return value;
  }
  // uniqueKeys is checked below in one pass: the parser's own check compares every pair of keys
  const doc = parseDocument(text, { prettyErrors: false, uniqueKeys: false });
  if (doc.errors.length > 0) {
    const err = doc.errors[0];
    const lp = err.linePos?.[0];
    const [line, col] = lp ? [lp.line, lp.col] : lineCol(text, err.pos[0]);
    const msg = err.message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '');
    const why = /call stack/i.test(msg) ? `nested too deeply` : `YAML syntax error: ${clip(msg)}`;
    throw new UserError(`${label}: line ${line}, column ${col}: ${why}`);
  }
  checkYamlStructure(doc.contents as YamlNode | null, text, label);
  try {
    // aliases expand here; the default alias budget stops a "billion laughs" document
    return doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    const msg = (e as Error).message ?? String(e);
    const why = /alias count/i.test(msg)
      ? 'its aliases expand to too much (an alias bomb?)'
      : /alias/i.test(msg)
        ? `YAML error: ${clip(msg.split('\n')[0])}`
        : e instanceof RangeError
          ? 'nested too deeply'
          : `YAML error: ${clip(msg.split('\n')[0])}`;
    throw new UserError(`${label}: ${why}`);
  }
}

/** A parser's message, cut to a readable length (it may quote the input). */
function clip(msg: string, max = 160): string {
  return msg.length > max ? msg.slice(0, max - 1) + '…' : msg;
}

function readFailure(path: string, what: string, e: unknown): UserError {
  const code = (e as NodeJS.ErrnoException).code;
  const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
  return new UserError(`${path}: cannot read the ${what}: ${why}`);
}

/**
 * Reads a whole regular file of at most `maxBytes`, refusing anything else before reading: a FIFO or
 * device would block, a huge file would exhaust memory. Opened non-blocking so a FIFO never hangs the open.
 */
export function readBoundedFile(path: string, what: string, maxBytes: number): Buffer {
  let fd: number;
  try {
    fd = openSync(path, fsConstants.O_RDONLY | (fsConstants.O_NONBLOCK ?? 0));
  } catch (e) {
    throw readFailure(path, what, e);
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) throw new UserError(`${path}: cannot read the ${what}: is a folder, not a file`);
    if (!st.isFile()) throw new UserError(`${path}: cannot read the ${what}: not a regular file (a pipe, socket or device)`);
    if (st.size > maxBytes) throw new UserError(`${path}: the ${what} is ${(st.size / 2 ** 20).toFixed(1)} MB, more than the ${(maxBytes / 2 ** 20).toFixed(0)} MB allowed`);
    const buf = Buffer.alloc(st.size);
    let at = 0;
    while (at < buf.length) {
      const n = readSync(fd, buf, at, buf.length - at, at);
      if (n === 0) break;
      at += n;
    }
    return at === buf.length ? buf : buf.subarray(0, at);
  } catch (e) {
    if (e instanceof UserError) throw e;
    throw readFailure(path, what, e);
  } finally {
    closeSync(fd);
  }
}

export function readTextFile(path: string, what: string): string {
  return readBoundedFile(path, what, MAX_DOCUMENT_BYTES).toString('utf8');
}

/** Larger than any mesh skyfold writes (a 1025-column grid as .glb is under 40 MB). */
export const MAX_BINARY_BYTES = 256 * 2 ** 20;

export function readBinaryFile(path: string, what: string, maxBytes = MAX_BINARY_BYTES): Uint8Array {
  const bytes = readBoundedFile(path, what, maxBytes);
  return new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/**
 * Reads, parses and checks a document file (`what` names it in errors: "rig file"); every failure,
 * from a missing file to the core's RigError naming a field, is a one-line UserError naming the file.
 */
export function readDocumentFile<T>(path: string, what: string, fromDocument: (document: unknown) => T): { value: T; document: unknown } {
  const document = parseDocumentText(readTextFile(path, what), path);
  try {
    return { value: fromDocument(document), document };
  } catch (e) {
    if (e instanceof RigError) throw new UserError(`${path}: ${e.message}`);
    throw e;
  }
}

export interface LoadedRig {
  rig: Rig;
  /** The document as read (for metadata). */
  document: unknown;
  warnings: string[];
  path: string;
}

/** Warp mesh files skyfold writes that carry no rig (the .glb does, in its extras). */
const MESH_ONLY_EXTENSIONS = ['.obj', '.pfm', '.mpcdi', '.png', '.csv'];

/**
 * Reads, parses and validates a rig file — or a .glb baked by skyfold, whose root `extras.rig` holds
 * the rig document (in metres); every failure is a one-line UserError naming the file and field.
 */
export function loadRig(path: string): LoadedRig {
  const ext = /\.[^./\\]+$/.exec(path)?.[0]?.toLowerCase() ?? '';
  if (MESH_ONLY_EXTENSIONS.includes(ext)) throw new UserError(`${path} is a warp mesh; this command needs the rig (or a .glb baked by skyfold)`);
  const parse = (document: unknown) => rigFromDocument(document, { loadMesh: (file) => readDomeMesh(path, file) });
  let rig: Rig;
  let document: unknown;
  if (ext === '.glb') {
    const bytes = readBinaryFile(path, 'mesh');
    document = rigDocumentOfGlb(bytes, path);
    try {
      rig = rigFromDocument(glbStandAlone(document), { loadMesh: () => glbDome(bytes, path) });
    } catch (e) {
      if (e instanceof RigError) throw new UserError(`${path}: the rig in its extras: ${e.message}`);
      throw e;
    }
  } else ({ value: rig, document } = readDocumentFile(path, 'rig file', parse));
  return { rig, document, warnings: rigWarnings(rig).map((w) => `${path}: ${w}`), path };
}

/**
 * A .glb baked from an as-built dome stands alone: its rig names the dome's mesh file, but the
 * triangles travel inside it (export/glb.ts, the mesh `as-built-dome`, in metres), so the rig is read
 * with those, their units metres, and never looks for the file beside the .glb.
 */
function glbStandAlone(document: unknown): unknown {
  const dome = (document as { dome?: unknown }).dome;
  if (dome === null || typeof dome !== 'object' || (dome as { mesh?: unknown }).mesh === undefined) return document;
  return { ...(document as object), dome: { ...(dome as object), meshUnits: 'm' } };
}

/** The as-built dome's triangles a skyfold .glb carries; a one-line UserError when it has none or they are damaged. */
function glbDome(bytes: Uint8Array, path: string): TriangleSoup {
  let soup: TriangleSoup | undefined;
  try {
    soup = glbTriangles(bytes, GLB_DOME_NAME);
  } catch (e) {
    throw new UserError(`${path}: the as-built dome it carries cannot be read: ${(e as Error).message}`);
  }
  if (!soup) throw new UserError(`${path}: its rig has an as-built dome (dome.mesh), but the .glb carries no "${GLB_DOME_NAME}" triangles; re-bake it from the rig`);
  return soup;
}

/**
 * The rig document a skyfold .glb carries: the JSON chunk of the binary glTF (Khronos glTF 2.0, Sec.
 * 4.4: a 12-byte header "glTF", version 2, length; then a chunk of length, type "JSON" and the JSON
 * text), its root `extras.rig`.
 */
function rigDocumentOfGlb(bytes: Uint8Array, path: string): unknown {
  const notOurs = `${path}: not a .glb baked by skyfold (no rig in its extras); this command needs the rig (or a .glb baked by skyfold)`;
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.length < 20 || dv.getUint32(0, true) !== 0x46546c67 || dv.getUint32(16, true) !== 0x4e4f534a) throw new UserError(`${path}: not a binary glTF file`);
  const length = dv.getUint32(12, true);
  if (20 + length > bytes.length) throw new UserError(`${path}: not a binary glTF file (its JSON chunk runs past the end)`);
  let json: { extras?: { rig?: unknown } };
  try {
    json = JSON.parse(new TextDecoder().decode(bytes.subarray(20, 20 + length)));
  } catch {
    throw new UserError(`${path}: not a binary glTF file (its JSON chunk does not parse)`);
  }
  const rig = json?.extras?.rig;
  if (rig === null || typeof rig !== 'object') throw new UserError(notOurs);
  return rig;
}

/** The rig file a command was given: loaded as {@link loadRig} does, its warnings printed to standard error. */
export function readRig(path: string): Rig {
  const loaded = loadRig(path);
  loaded.warnings.forEach(warn);
  return loaded.rig;
}
