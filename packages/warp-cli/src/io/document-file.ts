/** Reads YAML or JSON documents from disk with one-line errors that give line and column. */
import { readFileSync } from 'node:fs';
import { parseDocument } from 'yaml';
import { RigError, rigFromDocument, rigWarnings, type Rig } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { warn } from '../messages.js';
import { readDomeMesh } from './dome-mesh-file.js';

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

/** Parses a YAML (or, for .json files, JSON) document; syntax errors become UserErrors with line and column. */
export function parseDocumentText(text: string, label: string): unknown {
  if (label.toLowerCase().endsWith('.json')) {
    try {
      return JSON.parse(text);
    } catch (e) {
      const msg = (e as Error).message;
      const m = /position (\d+)/.exec(msg);
      const where = m ? (([l, c]) => `line ${l}, column ${c}: `)(lineCol(text, Number(m[1]))) : '';
      throw new UserError(`${label}: ${where}JSON syntax error: ${msg.split('\n')[0]}`);
    }
  }
  const doc = parseDocument(text, { prettyErrors: false, uniqueKeys: true });
  if (doc.errors.length > 0) {
    const err = doc.errors[0];
    const lp = err.linePos?.[0];
    const [line, col] = lp ? [lp.line, lp.col] : lineCol(text, err.pos[0]);
    const where = `line ${line}, column ${col}: `;
    const msg = err.message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '');
    throw new UserError(`${label}: ${where}YAML syntax error: ${msg}`);
  }
  return doc.toJS();
}

function readFailure(path: string, what: string, e: unknown): UserError {
  const code = (e as NodeJS.ErrnoException).code;
  const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
  return new UserError(`${path}: cannot read the ${what}: ${why}`);
}

export function readTextFile(path: string, what: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw readFailure(path, what, e);
  }
}

export function readBinaryFile(path: string, what: string): Uint8Array {
  try {
    const bytes = readFileSync(path);
    return new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  } catch (e) {
    throw readFailure(path, what, e);
  }
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

/** Reads, parses and validates a rig file; every failure is a one-line UserError naming the file and field. */
export function loadRig(path: string): LoadedRig {
  const { value: rig, document } = readDocumentFile(path, 'rig file', (document) => rigFromDocument(document, { loadMesh: (file) => readDomeMesh(path, file) }));
  return { rig, document, warnings: rigWarnings(rig).map((w) => `${path}: ${w}`), path };
}

/** The rig file a command was given: loaded as {@link loadRig} does, its warnings printed to standard error. */
export function readRig(path: string): Rig {
  const loaded = loadRig(path);
  loaded.warnings.forEach(warn);
  return loaded.rig;
}
