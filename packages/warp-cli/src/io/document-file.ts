/** Reads YAML or JSON documents from disk with one-line errors that give line and column. */
import { readFileSync } from 'node:fs';
import { parseDocument } from 'yaml';
import { RigError, rigFromDocument, rigWarnings, type Rig } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
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

export function readTextFile(path: string, what: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
    throw new UserError(`${path}: cannot read the ${what}: ${why}`);
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
  const text = readTextFile(path, 'rig file');
  const document = parseDocumentText(text, path);
  try {
    const rig = rigFromDocument(document, { loadMesh: (file) => readDomeMesh(path, file) });
    return { rig, document, warnings: rigWarnings(rig).map((w) => `${path}: ${w}`), path };
  } catch (e) {
    if (e instanceof RigError) throw new UserError(`${path}: ${e.message}`);
    throw e;
  }
}
