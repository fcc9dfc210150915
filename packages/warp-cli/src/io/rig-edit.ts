/**
 * Writes a changed rig back into the user's own rig document, the way a careful person would edit
 * the file by hand: comments, order and layout stay (the yaml library's Document API keeps them),
 * only the values that changed change, and each in the form the user wrote it — a diameter stays a
 * diameter, a cap stays a cap, a string with units ("5 ft 3 in") stays a string in the document's
 * units, a bare number stays a bare number in the document's units.
 */
import { isScalar, isSeq, parseDocument, stringify, type Document, type Scalar } from 'yaml';
import { readTextFile } from './document-file.js';
import { formatLength, fromMetres, mirrorPole, parseLengthString, RAD, rigToDocument, toMetres, type LengthUnit, type Rig } from '@skyfold/warp-core';

type Path = readonly (string | number)[];

/** Decimals a bare length keeps, as in rigToDocument (so a written file and the --json output agree). */
const BARE_DECIMALS = 6;
/** Decimals a length string keeps: a tenth of a millimetre, a hundredth of an inch, as a tape is read. */
const STRING_DECIMALS: Record<LengthUnit, number> = { m: 4, cm: 2, mm: 1, ft: 2, in: 2 };
/** Below these, a value counts as unchanged (a tenth of a micrometre; a nanoradian; a part in a billion). */
const SAME_LENGTH = 1e-7;
/** Decimals of a degree an angle keeps. */
const ANGLE_DECIMALS = 5;
const SAME_ANGLE = 1e-9;
const SAME_NUMBER = 1e-9;

function rounded(x: number, decimals: number): number {
  const v = Number(x.toFixed(decimals));
  return Object.is(v, -0) ? 0 : v;
}

/** A length as a string with its unit, in the document's units ("5 ft 3.25 in", "2.41 m"). */
function lengthString(metres: number, units: LengthUnit): string {
  return units === 'ft' ? formatLength(metres, 'ft') : formatLength(metres, units, STRING_DECIMALS[units]);
}

export class RigDocumentEditor {
  /** The rig fields whose values were written, and the document path each went to. */
  readonly written = new Map<string, Path>();

  constructor(readonly doc: Document, readonly units: LengthUnit) {}

  private scalar(path: Path): Scalar | undefined {
    const node = this.doc.getIn(path, true);
    return isScalar(node) ? node : undefined;
  }

  has(path: Path): boolean {
    return this.doc.hasIn(path);
  }

  /** Sets a length at path in the form the node holds (string with units, or bare number); adds it when missing. */
  length(field: string, path: Path, metres: number): void {
    const node = this.scalar(path);
    if (node) {
      if (typeof node.value === 'string') node.value = lengthString(metres, this.units);
      else node.value = rounded(fromMetres(metres, this.units), BARE_DECIMALS);
    } else this.doc.setIn(path, this.units === 'ft' ? lengthString(metres, 'ft') : rounded(fromMetres(metres, this.units), BARE_DECIMALS));
    this.written.set(field, path);
  }

  /** Sets the components of a point that changed, each in its own node's form. */
  point(field: string, path: Path, before: readonly number[], after: readonly number[]): void {
    const seq = this.doc.getIn(path, true);
    if (!isSeq(seq) || seq.items.length !== after.length) {
      this.doc.setIn(path, after.map((m) => rounded(fromMetres(m, this.units), BARE_DECIMALS)));
      this.written.set(field, path);
      return;
    }
    after.forEach((m, i) => {
      if (Math.abs(m - before[i]) > SAME_LENGTH) this.length(field, [...path, i], m);
    });
  }

  /** Sets a plain number (degrees for angles are the caller's business). */
  number(field: string, path: Path, value: number, decimals = 6): void {
    const node = this.scalar(path);
    if (node) node.value = rounded(value, decimals);
    else this.doc.setIn(path, rounded(value, decimals));
    this.written.set(field, path);
  }

  /** Sets the numbers of a list that changed (lens shift). */
  numbers(field: string, path: Path, before: readonly number[], after: readonly number[]): void {
    const seq = this.doc.getIn(path, true);
    if (!isSeq(seq) || seq.items.length !== after.length) {
      this.doc.setIn(path, after.map((x) => rounded(x, 6)));
      this.written.set(field, path);
      return;
    }
    after.forEach((x, i) => {
      if (Math.abs(x - before[i]) > SAME_NUMBER) this.number(field, [...path, i], x);
    });
  }

  /**
   * Sets a direction (any length in the document): the new unit vector scaled so its largest
   * component has the size the user's largest had, so [0, 1, 1] becomes [0, 0.97, 1], not a unit vector.
   */
  direction(field: string, path: Path, after: readonly number[]): void {
    const oldList = isSeq(this.doc.getIn(path, true)) ? ((this.doc.getIn(path, true) as { toJSON(): unknown }).toJSON() as unknown[]) : null;
    const numeric = oldList !== null && oldList.length === after.length && oldList.every((x) => typeof x === 'number');
    const size = numeric ? Math.max(...(oldList as number[]).map(Math.abs)) : 1;
    const largest = Math.max(...after.map(Math.abs));
    const scaled = after.map((x) => rounded((x * size) / largest, 6));
    if (!numeric) {
      this.doc.setIn(path, scaled);
      this.written.set(field, path);
      return;
    }
    this.numbers(field, path, oldList as number[], scaled);
  }
}

const sameLength = (a: number, b: number) => Math.abs(a - b) <= SAME_LENGTH;
const samePoint = (a: readonly number[], b: readonly number[]) => a.every((x, i) => sameLength(x, b[i]));
const sameAngle = (a: number, b: number) => Math.abs(a - b) <= SAME_ANGLE;
const sameNumbers = (a: readonly number[], b: readonly number[]) => a.every((x, i) => Math.abs(x - b[i]) <= SAME_NUMBER);

/**
 * Writes into `doc` (the document `before` was read from) every value in which `after` differs from
 * `before`, and returns the editor, whose `written` map says which rig fields went to which paths.
 */
export function editRigDocument(doc: Document, before: Rig, after: Rig): RigDocumentEditor {
  const e = new RigDocumentEditor(doc, before.units);
  editDome(e, before, after);
  editMirror(e, before, after);
  editProjector(e, before, after);
  if (!samePoint(before.content.eye, after.content.eye)) e.point('content.eye', ['content', 'eye'], before.content.eye, after.content.eye);
  if (!sameAngle(before.content.fov, after.content.fov)) e.number('content.fov', ['content', 'fov'], after.content.fov * RAD, ANGLE_DECIMALS);
  return e;
}

function editDome(e: RigDocumentEditor, before: Rig, after: Rig): void {
  const R = after.dome.radius;
  if (!sameLength(before.dome.radius, R)) {
    if (e.has(['dome', 'diameter'])) e.length('dome.radius', ['dome', 'diameter'], 2 * R);
    else e.length('dome.radius', ['dome', 'radius'], R);
  }
  const floor = after.dome.floor;
  if (floor !== undefined && (before.dome.floor === undefined || !sameLength(before.dome.floor, floor))) e.length('dome.floor', ['dome', 'floor'], floor);
}

function editMirror(e: RigDocumentEditor, before: Rig, after: Rig): void {
  const m0 = before.mirror;
  const m = after.mirror;
  if (!sameLength(m0.radius, m.radius)) {
    const width = e.doc.getIn(['mirror', 'cap', 'width']);
    if (e.has(['mirror', 'cap']) && width !== undefined) {
      // keep the rim the user measured; the depth follows from the sagitta relation r = (s² + (w/2)²) / (2s)
      const half = fromLengthNode(e, ['mirror', 'cap', 'width']) / 2;
      // a cap deeper than a hemisphere (its half-angle past 90°) keeps the deep root of the relation
      const rest = Math.sqrt(Math.max(0, m.radius * m.radius - half * half));
      const depth = m0.capAngle > Math.PI / 2 ? m.radius + rest : m.radius - rest;
      e.length('mirror.radius', ['mirror', 'cap', 'depth'], depth);
    } else e.length('mirror.radius', ['mirror', 'radius'], m.radius);
  }
  if (e.has(['mirror', 'pole'])) {
    // the user placed the mirror by its apex: write the apex back, which moves with the radius and the axis too
    const p0 = mirrorPole(m0);
    const p = mirrorPole(m);
    if (!samePoint(p0, p)) e.point('mirror.center', ['mirror', 'pole'], p0, p);
  } else if (!samePoint(m0.center, m.center)) e.point('mirror.center', ['mirror', 'center'], m0.center, m.center);
  if (!sameNumbers(m0.axis, m.axis)) e.direction('mirror.axis', ['mirror', 'axis'], m.axis);
  if (!sameAngle(m0.capAngle, m.capAngle)) e.number('mirror.capAngle', ['mirror', 'capAngle'], m.capAngle * RAD, ANGLE_DECIMALS);
}

/** The metres a length node holds, read as the rig reader reads it: a bare number in the document's units, or a string with its unit. */
function fromLengthNode(e: RigDocumentEditor, path: Path): number {
  const v = e.doc.getIn(path);
  return typeof v === 'number' ? toMetres(v, e.units) : parseLengthString(String(v));
}

function editProjector(e: RigDocumentEditor, before: Rig, after: Rig): void {
  const p0 = before.projector;
  const p = after.projector;
  if (!samePoint(p0.position, p.position)) e.point('projector.position', ['projector', 'position'], p0.position, p.position);
  if (!samePoint(p0.lookAt, p.lookAt)) e.point('projector.lookAt', ['projector', 'lookAt'], p0.lookAt, p.lookAt);
  if (!sameAngle(p0.roll, p.roll)) e.number('projector.roll', ['projector', 'roll'], p.roll * RAD, ANGLE_DECIMALS);
  if (p.up && (!p0.up || !sameNumbers(p0.up, p.up))) e.direction('projector.up', ['projector', 'up'], p.up);
  if (Math.abs(p0.throwRatio - p.throwRatio) > SAME_NUMBER) e.number('projector.throwRatio', ['projector', 'throwRatio'], p.throwRatio);
  if (!sameNumbers(p0.lensShift, p.lensShift)) e.numbers('projector.lensShift', ['projector', 'lensShift'], p0.lensShift, p.lensShift);
}

/** Where a line's trailing comment starts (a `#` after a space, outside quotes), or -1. */
function commentStart(line: string): number {
  let quote = '';
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quote) {
      if (c === '\\' && quote === '"') i++;
      else if (c === quote) quote = '';
    } else if (c === '"' || c === "'") quote = c;
    else if (c === '#' && (i === 0 || line[i - 1] === ' ' || line[i - 1] === '\t')) return i;
  }
  return -1;
}

interface CommentedLine {
  /** The node the line holds, as a path of keys and item numbers ("mirror.center", "dome.walls[1]"). */
  path: string;
  /** Column of the `#`, length of the text before it (trailing spaces left out). */
  column: number;
  head: number;
  /** Lines next to each other whose comments share a column form one group. */
  group: number;
}

/**
 * The block-style node path of every line that holds a key or a list item with a trailing comment.
 * A line walker over indentation, enough for rig files (flow lists and maps stay on their key's line).
 */
function commentedLines(text: string): (CommentedLine | undefined)[] {
  const stack: { indent: number; name: string; item: boolean; items: number }[] = [];
  const out: (CommentedLine | undefined)[] = [];
  let group = 0;
  let last: CommentedLine | undefined;
  let blockScalar = -1; // indentation of a key whose value is a | or > block: deeper lines are text
  for (const line of text.split('\n')) {
    const indent = line.length - line.trimStart().length;
    const body = line.trim();
    if (blockScalar >= 0 && (body === '' || indent > blockScalar)) {
      out.push(undefined);
      continue;
    }
    blockScalar = -1;
    if (body === '' || body.startsWith('#') || body === '---' || body === '...') {
      out.push(undefined);
      if (body !== '' && !body.startsWith('#')) stack.length = 0;
      last = undefined;
      continue;
    }
    let rest = line.slice(indent);
    let at = indent;
    let path: string | undefined;
    for (;;) {
      if (rest === '-' || rest.startsWith('- ')) {
        while (stack.length && (stack.at(-1)!.indent > at || (stack.at(-1)!.indent === at && stack.at(-1)!.item))) stack.pop();
        const parent = stack.at(-1);
        const name = `${parent ? parent.name : ''}[${parent ? parent.items++ : 0}]`;
        stack.push({ indent: at, name, item: true, items: 0 });
        path = name;
        const step = rest.length - rest.slice(1).trimStart().length;
        rest = rest.slice(step);
        at += step;
        if (rest === '') break;
        continue;
      }
      const key = /^("(?:[^"\\]|\\.)*"|'[^']*'|[^\s#:][^:#]*?):(?:\s|$)/.exec(rest);
      if (key) {
        while (stack.length && stack.at(-1)!.indent >= at) stack.pop();
        const parent = stack.at(-1);
        const name = parent ? `${parent.name}.${key[1]}` : key[1];
        stack.push({ indent: at, name, item: false, items: 0 });
        path = name;
        if (/:\s*[|>][-+0-9]*\s*(#.*)?$/.test(rest)) blockScalar = at;
      }
      break;
    }
    const hash = commentStart(line);
    if (path === undefined || hash < 0) {
      out.push(undefined);
      last = undefined;
      continue;
    }
    const head = line.slice(0, hash).trimEnd().length;
    if (!last || last.column !== hash) group++;
    last = { path, column: hash, head, group };
    out.push(last);
  }
  return out;
}

/**
 * The edited text with each trailing comment where the user had it: at its old column while the
 * line's new value leaves a space before it (the yaml library writes one space before a comment). A
 * value that grew past it moves the comment right, by the gap the user left before it (one to three
 * spaces), and with it every comment aligned with it on the lines around it, so that a column of
 * comments stays a column.
 */
export function keepCommentColumns(original: string, edited: string): string {
  const before = new Map<string, CommentedLine>();
  for (const line of commentedLines(original)) if (line) before.set(line.path, line);
  const lines = edited.split('\n');
  const found = commentedLines(edited);
  // the column each original group needs: its old one, or more where an edited value grew into it
  const needs = new Map<number, number>();
  const gaps = new Map<number, number>();
  for (const line of before.values()) gaps.set(line.group, Math.min(gaps.get(line.group) ?? Infinity, line.column - line.head));
  for (const line of found) {
    const old = line && before.get(line.path);
    if (!old) continue;
    const gap = Math.max(1, Math.min(3, gaps.get(old.group)!));
    const column = line.head < old.column ? old.column : line.head + gap;
    needs.set(old.group, Math.max(needs.get(old.group) ?? old.column, column));
  }
  return lines
    .map((text, i) => {
      const line = found[i];
      const old = line && before.get(line.path);
      if (!line || !old) return text;
      const column = needs.get(old.group)!;
      const head = text.slice(0, line.head);
      return `${head.padEnd(column)}${text.slice(line.column)}`;
    })
    .join('\n');
}

/**
 * The user's rig text (`before` was read from it) with every value in which `after` differs written in
 * the form the user wrote it; `annotate` may add comments to the document first; trailing comments keep
 * their columns. The one way fit, plan and the live page's save write a rig back.
 */
export function editedRigText(rigText: string, before: Rig, after: Rig, annotate?: (doc: ReturnType<typeof parseDocument>, edit: RigDocumentEditor) => void): string {
  const doc = parseDocument(rigText);
  const edit = editRigDocument(doc, before, after);
  annotate?.(doc, edit);
  return keepCommentColumns(rigText, doc.toString({ lineWidth: 0, flowCollectionPadding: false }));
}

/** The text of the rig document to edit: the user's own file, or for a rig read from a .glb (which has no text of its own) the rig written afresh. */
export function rigDocumentText(path: string, rig: Rig): string {
  return path.toLowerCase().endsWith('.glb') ? stringify(rigToDocument(rig), { flow: false }) : readTextFile(path, 'rig file');
}
