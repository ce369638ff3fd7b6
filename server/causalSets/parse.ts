import type { RegionSpec } from '@shared/vacuum';
import { BitRelation, causalMatrix } from '../engine/order';
import { RelationCycleError, transitiveClosure } from '../engine/orderAlgorithms';
import { makeRegion } from '../engine/regions';
import { centredDiamondOfReach, centredDiamondReach, recordedRegion, regionProposalText } from '@shared/regionProposal';

/**
 * Parsing and validation of uploaded causal sets (pure: bytes in, typed arrays out, no I/O).
 *
 * Both file kinds are comma-separated text in UTF-8 (a byte-order mark is ignored). Rows are counted
 * from 1 as lines of the file, columns from 1, so a message can be checked in any editor. Blank lines
 * and lines starting with `#` (generator notes) are skipped but still counted.
 */

export interface FileProblem {
  /** line of the file, from 1; null when the problem is the file as a whole */
  row: number | null;
  /** column from 1; null when the problem is the whole row */
  column: number | null;
  /** says where (row and column) and what is wrong */
  message: string;
}

export type FileErrorCode = 'empty_file' | 'invalid_file' | 'too_large';

/** A file that cannot become a causal set; `problems` lists the first few in file order. */
export class CausalSetFileError extends Error {
  override readonly name = 'CausalSetFileError';
  constructor(
    readonly code: FileErrorCode,
    readonly problems: FileProblem[],
    /** problems found beyond those listed (scanning stops after MAX_PROBLEMS) */
    readonly more = 0,
    /** how to fix them all, listed last among `problems` and not counted as one */
    note?: string,
  ) {
    const count = problems.length - (note ? 1 : 0) + more;
    super(
      problems.length === 0
        ? 'the file is not a valid causal set'
        : problems[0].message + (count > 1 ? ` (and ${count - 1} more problem${count > 2 ? 's' : ''})` : '') + (note ? `; ${note}` : ''),
    );
  }
}

/** Enough to fix a file in one go without drowning the reader. */
export const MAX_PROBLEMS = 20;

class ProblemList {
  readonly items: FileProblem[] = [];
  more = 0;
  add(row: number | null, column: number | null, what: string): void {
    if (this.items.length >= MAX_PROBLEMS) {
      this.more += 1;
      return;
    }
    const where = row === null ? '' : column === null ? `row ${row}: ` : `row ${row}, column ${column}: `;
    this.items.push({ row, column, message: where + what });
  }
  /** A closing note after the listed rows (how to fix them all), kept even when the list is full. */
  hint(what: string): void {
    this.note = what;
  }
  private note: string | undefined;
  get full(): boolean {
    return this.items.length >= MAX_PROBLEMS;
  }
  throwIfAny(code: FileErrorCode = 'invalid_file'): void {
    if (this.items.length) throw new CausalSetFileError(code, this.note ? [...this.items, { row: null, column: null, message: this.note }] : this.items, this.more, this.note);
  }
}

function fail(code: FileErrorCode, row: number | null, column: number | null, what: string): never {
  const list = new ProblemList();
  list.add(row, column, what);
  throw new CausalSetFileError(code, list.items);
}

/** Decodes the upload as UTF-8 text (a byte-order mark is dropped); empty, binary or non-UTF-8 files fail. */
function decodeText(bytes: Uint8Array | string): string {
  let text: string;
  if (typeof bytes === 'string') {
    text = bytes;
  } else {
    if (bytes.length === 0) fail('empty_file', null, null, 'the file is empty');
    if (bytes.includes(0)) fail('invalid_file', null, null, 'the file is not text (it contains NUL bytes); upload a CSV file');
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    } catch {
      fail('invalid_file', null, null, 'the file is not valid UTF-8 text; upload a CSV file');
    }
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/**
 * Calls `visit(row, line)` for every line that is neither blank nor a `#` note, with the line trimmed
 * and its number in the file; stops early when `visit` returns false. Walks the text with indexOf
 * instead of splitting it, so a relation list of millions of rows is not copied into an array first.
 * Returns the number of lines visited.
 */
function forEachContentLine(text: string, visit: (row: number, line: string) => boolean | void): number {
  let row = 0;
  let visited = 0;
  let start = 0;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end === -1) end = text.length;
    row += 1;
    let line = text.slice(start, end);
    // a lone \r ends a line too (old Mac files); \r\n leaves a \r that trim() removes
    const cr = line.indexOf('\r');
    if (cr !== -1 && cr < line.length - 1) {
      const parts = line.split('\r');
      for (let k = 0; k < parts.length; k++) {
        const piece = parts[k].trim();
        if (k > 0) row += 1;
        if (piece === '' || piece.startsWith('#')) continue;
        visited += 1;
        if (visit(row, piece) === false) return visited;
      }
    } else {
      line = line.trim();
      if (line !== '' && !line.startsWith('#')) {
        visited += 1;
        if (visit(row, line) === false) return visited;
      }
    }
    start = end + 1;
  }
  if (visited === 0) fail('empty_file', null, null, 'the file is empty (no rows besides blank lines and # comments)');
  return visited;
}

function splitCells(line: string): string[] {
  return line.split(',').map(unquote);
}

function unquote(cell: string): string {
  const s = cell.trim();
  return s.length >= 2 && s.startsWith('"') && s.endsWith('"') ? s.slice(1, -1).trim() : s;
}

const decimalPattern = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const nonFinitePattern = /^[+-]?(nan|inf|infinity)$/i;

/** A finite decimal number, or the reason the cell is not one. */
function readNumber(cell: string): number | string {
  if (cell === '') return 'the cell is empty; expected a number';
  if (nonFinitePattern.test(cell)) return `"${cell}" is not a finite number (NaN and Inf are not coordinates)`;
  if (!decimalPattern.test(cell)) return `"${cell}" is not a number`;
  const value = Number(cell);
  if (!Number.isFinite(value)) return `"${cell}" is not a finite number (it overflows double precision)`;
  return value;
}

/** Throws too_large with the engine's reason when n exceeds the dense limit. */
export function checkElementCount(n: number, maxElements: number, reason: string): void {
  if (n > maxElements) {
    fail('too_large', null, null, `the causal set has ${n} elements, more than the engine can hold (${maxElements}): ${reason}`);
  }
  if (n < 2) fail('invalid_file', null, null, `a causal set needs at least 2 elements, the file has ${n}`);
}

export interface SizeLimit {
  maxElements: number;
  /** why the limit is what it is, for the message */
  reason: string;
}

export interface ParsedCoordinates {
  dimension: 2 | 4;
  columns: string[];
  n: number;
  /** flat, `dimension` numbers per element, in file order */
  points: Float64Array;
}

const headers: Record<2 | 4, string[]> = { 2: ['t', 'x'], 4: ['t', 'x', 'y', 'z'] };

/**
 * A coordinates CSV: header `t,x` (2D) or `t,x,y,z` (4D Minkowski), then one element per row. Every
 * cell must be a finite decimal number, every row as wide as the header, no point may repeat, and
 * when a region is given every point must lie inside it (exact membership, shared/vacuum regions).
 */
export function parseCoordinatesCsv(
  bytes: Uint8Array | string,
  options: { region?: RegionSpec; dimension?: 2 | 4; limit: SizeLimit },
): ParsedCoordinates {
  const text = decodeText(bytes);
  let firstLine: { row: number; line: string } | null = null;
  const total = forEachContentLine(text, (row, line) => {
    firstLine ??= { row, line };
  });
  const { row: headerRow, line: headerLine } = firstLine as unknown as { row: number; line: string };
  const header = { row: headerRow, cells: splitCells(headerLine) };
  const names = header.cells.map((c) => c.toLowerCase());
  const dimension = names.length === 2 && names.join(',') === 't,x' ? 2 : names.length === 4 && names.join(',') === 't,x,y,z' ? 4 : null;
  if (dimension === null) {
    const looksNumeric = header.cells.every((c) => typeof readNumber(c) === 'number');
    fail(
      'invalid_file',
      header.row,
      null,
      looksNumeric
        ? `the header is missing: the first row must name the columns, t,x for 2D or t,x,y,z for 4D (it holds numbers)`
        : `wrong header "${header.cells.join(',')}": the columns must be t,x for 2D or t,x,y,z for 4D, in that order`,
    );
  }
  if (options.dimension !== undefined && options.dimension !== dimension) {
    fail('invalid_file', header.row, null, `the header t,${headers[dimension].slice(1).join(',')} is ${dimension}D but the form says ${options.dimension}D`);
  }
  const n = total - 1;
  if (n === 0) fail('empty_file', null, null, 'the file has a header but no elements');
  checkElementCount(n, options.limit.maxElements, options.limit.reason);

  const region = options.region ? makeRegion(options.region) : null;
  if (region && region.dimension !== dimension) {
    fail('invalid_file', header.row, null, `the header is ${dimension}D but the region ${options.region!.kind} is ${region.dimension}D`);
  }
  const columns = headers[dimension];
  const points = new Float64Array(n * dimension);
  const problems = new ProblemList();
  const seen = new Map<string, number>();
  const event = new Float64Array(dimension);
  let next = -1;
  let outside = false;
  forEachContentLine(text, (row, line) => {
    const e = next++;
    if (e < 0) return true; // the header
    if (problems.full) return false;
    const cells = splitCells(line);
    if (cells.length !== dimension) {
      problems.add(row, null, `${cells.length} column${cells.length === 1 ? '' : 's'}, but the header ${columns.join(',')} has ${dimension}`);
      return true;
    }
    let rowOk = true;
    for (let c = 0; c < dimension; c++) {
      const value = readNumber(cells[c]);
      if (typeof value === 'string') {
        problems.add(row, c + 1, `(${columns[c]}) ${value}`);
        rowOk = false;
      } else {
        event[c] = value;
      }
    }
    if (!rowOk) return true;
    points.set(event, e * dimension);
    const key = Array.from(event).join(',');
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      problems.add(row, null, `duplicate point: (${formatEvent(columns, event)}) already appears in row ${earlier}`);
      return true;
    }
    seen.set(key, row);
    if (region && !region.contains(event)) {
      outside = true;
      problems.add(row, null, `the point (${formatEvent(columns, event)}) lies outside the stated region (${options.region!.kind})`);
    }
    return true;
  });
  if (outside) problems.hint(regionHint(text, dimension, options.region!));
  problems.throwIfAny();
  return { dimension, columns, n, points };
}

/**
 * What to say when points fall outside the stated region: the region the file records (a `tacet
 * sprinkle` file), else the smallest centred diamond holding every readable point.
 */
function regionHint(text: string, dimension: 2 | 4, stated: RegionSpec): string {
  const recorded = recordedRegion(text);
  if (recorded && JSON.stringify(recorded) !== JSON.stringify(stated)) return `the file records the region it was made in: ${regionProposalText(recorded)}; import it with that region`;
  let reach = 0;
  let header = true;
  forEachContentLine(text, (_row, line) => {
    if (header) return void (header = false);
    const values = splitCells(line).map(readNumber);
    if (values.length === dimension && values.every((v) => typeof v === 'number')) reach = Math.max(reach, centredDiamondReach(values as number[], dimension));
  });
  return `every point lies inside ${regionProposalText(centredDiamondOfReach(reach, dimension))}, the smallest centred diamond holding them; import with that region, or scale by a density instead`;
}

function formatEvent(columns: string[], event: ArrayLike<number>): string {
  return columns.map((name, c) => `${name} = ${event[c]}`).join(', ');
}

export interface ParsedRelations {
  n: number;
  /** rows `i,j` read (duplicates included) */
  pairsListed: number;
  /** the transitive closure: bit j of row i set iff i ≺ j */
  causal: BitRelation;
}

/**
 * A relation list: optional header `i,j`, then one pair per row, `i,j` meaning i ≺ j, with labels
 * 0..count−1. Checks each cell, irreflexivity and acyclicity, then returns the transitive closure.
 */
export function parseRelationList(bytes: Uint8Array | string, options: { count: number; limit: SizeLimit }): ParsedRelations {
  const { count } = options;
  checkElementCount(count, options.limit.maxElements, options.limit.reason);
  const text = decodeText(bytes);
  const from: number[] = [];
  const to: number[] = [];
  const rowOf: number[] = [];
  const problems = new ProblemList();
  const plainPair = /^(\d{1,9}),(\d{1,9})$/;
  let first = true;
  forEachContentLine(text, (row, line) => {
    if (first) {
      first = false;
      const cells = splitCells(line);
      if (cells.map((c) => c.toLowerCase()).join(',') === 'i,j') return true;
      if (cells.some((c) => !/^[+-]?\d/.test(c) && !nonFinitePattern.test(c))) {
        fail('invalid_file', row, null, `wrong header "${cells.join(',')}": a relation list has the header i,j or none`);
      }
    }
    if (problems.full) return false;
    // the common row, digits,digits, without splitting it
    const plain = plainPair.exec(line);
    if (plain) {
      const i = Number(plain[1]);
      const j = Number(plain[2]);
      if (i < count && j < count && i !== j) {
        from.push(i);
        to.push(j);
        rowOf.push(row);
        return true;
      }
    }
    const cells = splitCells(line);
    if (cells.length !== 2) {
      problems.add(row, null, `${cells.length} column${cells.length === 1 ? '' : 's'}, but a relation row has 2 (i,j: i precedes j)`);
      return true;
    }
    const ends: number[] = [];
    for (let c = 0; c < 2; c++) {
      const cell = cells[c];
      const name = c === 0 ? 'i' : 'j';
      let what: string | null = null;
      if (cell === '') what = 'the cell is empty; expected an element label';
      else if (nonFinitePattern.test(cell)) what = `"${cell}" is not a finite number; expected an element label`;
      else if (/^\d+$/.test(cell)) {
        const value = Number(cell);
        if (value >= count) what = `index out of range: element ${cell} does not exist (labels run from 0 to ${count - 1})`;
        else ends.push(value);
      } else if (/^-\d+$/.test(cell)) what = `index out of range: element ${cell} does not exist (labels run from 0 to ${count - 1})`;
      else if (decimalPattern.test(cell)) what = `"${cell}" is not a whole number; element labels are 0, 1, 2, …`;
      else what = `"${cell}" is not a number`;
      if (what) problems.add(row, c + 1, `(${name}) ${what}`);
    }
    if (ends.length !== 2) return true;
    if (ends[0] === ends[1]) {
      problems.add(row, null, `element ${ends[0]} cannot precede itself (a causal order is irreflexive)`);
      return true;
    }
    from.push(ends[0]);
    to.push(ends[1]);
    rowOf.push(row);
    return true;
  });
  problems.throwIfAny();
  return { n: count, pairsListed: from.length, causal: closeListedPairs(count, Int32Array.from(from), Int32Array.from(to), rowOf) };
}

/** The closure of the listed pairs; a cycle among them is reported with the rows it is made of. */
function closeListedPairs(count: number, from: Int32Array, to: Int32Array, rowOf: number[]): BitRelation {
  try {
    return transitiveClosure(count, from, to);
  } catch (error) {
    if (!(error instanceof RelationCycleError)) throw error;
    const rows = Array.from(error.pairs, (p) => rowOf[p]).sort((a, b) => a - b);
    const rowText = rows.length === 1 ? `row ${rows[0]}` : `rows ${rows.slice(0, -1).join(', ')} and ${rows[rows.length - 1]}`;
    const message = `${rowText} form a cycle ${Array.from(error.elements).join(' ≺ ')}; a causal order has no cycles`;
    throw new CausalSetFileError('invalid_file', [{ row: rows[0], column: null, message }]);
  }
}

/** The causal order of parsed coordinates (periodic x on the cylinder), for the summary on import. */
export function coordinatesOrder(points: Float64Array, dimension: 2 | 4, region?: RegionSpec): BitRelation {
  const periodX = region ? makeRegion(region).periodX : undefined;
  return causalMatrix(points, dimension, periodX);
}
