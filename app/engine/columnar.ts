import { EngineError } from './errors.ts';

/**
 * Compact column layout for imported responses (100,000 respondents × 200 columns and more).
 *
 * Each numeric column is stored on its own, in the narrowest form that gives every value back
 * exactly:
 *   - `int8`, `int16`, `int32`: integers k with value = k / 10^scale (scale 0–3, so 2.5 is k = 25,
 *     scale 1). The most negative integer of the width (−128, −32768, −2147483648) marks a missing
 *     value and is never a stored value.
 *   - `float32` when every value survives a round trip through single precision, else `float64`;
 *     NaN marks a missing value.
 * A 5-point Likert item therefore costs one byte per respondent.
 *
 * Byte form (`columnToBytes`), little-endian: bytes 0–3 the ASCII magic "SWC1"; byte 4 the kind
 * (1 int8, 2 int16, 3 int32, 4 float32, 5 float64); byte 5 the scale; bytes 6–7 zero; bytes 8–11 the
 * number of values (uint32); bytes 12–15 zero; then the values. The 16-byte header keeps the values
 * aligned for every width. This layout is our own; no published method is involved.
 */

export type ColumnKind = 'int8' | 'int16' | 'int32' | 'float32' | 'float64';

export interface EncodedColumn {
  kind: ColumnKind;
  /** Decimal places: value = stored integer / 10^scale (integer kinds only; 0 for floats). */
  scale: number;
  length: number;
  data: Int8Array | Int16Array | Int32Array | Float32Array | Float64Array;
}

/** Largest decimal scale tried before falling back to floating point. */
export const MAX_DECIMAL_SCALE = 3;

const MAGIC = [0x53, 0x57, 0x43, 0x31];
const HEADER_BYTES = 16;
const KIND_CODES: Record<ColumnKind, number> = { int8: 1, int16: 2, int32: 3, float32: 4, float64: 5 };
const CODE_KINDS: ColumnKind[] = ['int8', 'int8', 'int16', 'int32', 'float32', 'float64'];
const BYTES_PER_VALUE: Record<ColumnKind, number> = { int8: 1, int16: 2, int32: 4, float32: 4, float64: 8 };
const INT_LIMITS = { int8: 127, int16: 32767, int32: 2147483647 } as const;
const SENTINELS = { int8: -128, int16: -32768, int32: -2147483648 } as const;

/** The int8 value that marks a missing value (see the module comment). */
export const INT8_MISSING = SENTINELS.int8;
const POWERS = [1, 10, 100, 1000];
/**
 * Whether this machine stores numbers little-endian, as the byte form does: then integer columns are
 * copied to and from the byte form in one piece instead of value by value.
 */
const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
const INITIAL_CAPACITY = 1024;

type IntKind = keyof typeof INT_LIMITS;

function intKindFor(maxAbs: number): IntKind | undefined {
  if (maxAbs <= INT_LIMITS.int8) return 'int8';
  if (maxAbs <= INT_LIMITS.int16) return 'int16';
  if (maxAbs <= INT_LIMITS.int32) return 'int32';
  return undefined;
}

function allocate(kind: ColumnKind, capacity: number): EncodedColumn['data'] {
  switch (kind) {
    case 'int8':
      return new Int8Array(capacity);
    case 'int16':
      return new Int16Array(capacity);
    case 'int32':
      return new Int32Array(capacity);
    case 'float32':
      return new Float32Array(capacity);
    case 'float64':
      return new Float64Array(capacity);
  }
}

/** Smallest scale s ≤ MAX_DECIMAL_SCALE at which v·10^s is an integer that divides back to v exactly. */
function exactScale(v: number, from: number): number | undefined {
  for (let s = from; s <= MAX_DECIMAL_SCALE; s++) {
    const k = Math.round(v * POWERS[s]);
    if (k / POWERS[s] === v) return s;
  }
  return undefined;
}

/**
 * Builds one encoded column value by value, starting as int8 and widening (int16, int32, a larger
 * decimal scale, float32, float64) only when a value needs it, so a large import never holds the
 * column as 8-byte doubles. Widening rewrites the values so far: at most a handful of times per
 * column, so appending n values costs O(n) amortized.
 */
export class ColumnBuilder {
  private kind: ColumnKind = 'int8';
  private scale = 0;
  private maxAbs = 0;
  /** True when appendInt8 added values without updating maxAbs; widenFor computes it when needed. */
  private maxAbsPending = false;
  private data: EncodedColumn['data'];
  private count = 0;
  /** Largest magnitude the fast path may store: the integer limit at scale 0, else 0 (no fast path). */
  private intLimit: number = INT_LIMITS.int8;

  constructor(capacity = INITIAL_CAPACITY) {
    this.data = new Int8Array(Math.max(1, capacity));
  }

  /** Appends a value; NaN means missing, −0 is kept as 0. Throws EngineError for ±Infinity. */
  push(value: number): void {
    // Fast path for the common case (a small integer into an integer column without decimals):
    // one comparison chain and a store, no allocation. Everything else takes the general path.
    if (
      this.intLimit > 0 &&
      (value | 0) === value &&
      value <= this.intLimit &&
      value >= -this.intLimit &&
      this.count < this.data.length
    ) {
      if (value > this.maxAbs) this.maxAbs = value;
      else if (-value > this.maxAbs) this.maxAbs = -value;
      this.data[this.count++] = value;
      return;
    }
    this.pushGeneral(value);
  }

  private pushGeneral(value: number): void {
    const v = value === 0 ? 0 : value;
    if (this.count === this.data.length) this.grow(this.data.length * 2);
    if (Number.isNaN(v)) {
      this.data[this.count++] =
        this.kind === 'float32' || this.kind === 'float64' ? Number.NaN : SENTINELS[this.kind as IntKind];
      return;
    }
    if (!Number.isFinite(v)) throw new EngineError('a column cannot hold an infinite value');
    if (this.kind === 'float64') {
      this.data[this.count++] = v;
      return;
    }
    if (this.kind === 'float32') {
      if (Math.fround(v) !== v) this.rebuild('float64', 0);
      this.data[this.count++] = v;
      return;
    }
    const k = this.scale === 0 ? v : Math.round(v * POWERS[this.scale]);
    const abs = k < 0 ? -k : k;
    if (
      Number.isInteger(k) &&
      abs <= INT_LIMITS[this.kind as IntKind] &&
      (this.scale === 0 || k / POWERS[this.scale] === v)
    ) {
      if (abs > this.maxAbs) this.maxAbs = abs;
      this.data[this.count++] = k;
      return;
    }
    this.widenFor(v);
    this.pushGeneral(v);
  }

  /**
   * Appends the first `count` values of `values` (NaN = missing), as push would, but with the common
   * case — small integers into an integer column without decimals — in one loop over local variables.
   * Cost O(count) amortized. Throws EngineError for ±Infinity.
   */
  pushMany(values: ArrayLike<number>, count: number): void {
    if (this.count + count > this.data.length) this.grow(Math.max(this.count + count, this.data.length * 2));
    let i = 0;
    if (this.intLimit > 0) {
      const data = this.data;
      const limit = this.intLimit;
      let at = this.count;
      let maxAbs = this.maxAbs;
      for (; i < count; i++) {
        const v = values[i];
        if ((v | 0) !== v || v > limit || v < -limit) break;
        data[at++] = v;
        const abs = v < 0 ? -v : v;
        if (abs > maxAbs) maxAbs = abs;
      }
      this.count = at;
      this.maxAbs = maxAbs;
    }
    for (; i < count; i++) this.push(values[i]);
  }

  /**
   * Appends a block of int8 values (INT8_MISSING = missing) with one copy, when the column is still
   * int8 without decimals; returns false and appends nothing otherwise (then use push or pushMany).
   * This is the bulk path of a Likert import. Cost O(block length).
   */
  appendInt8(block: Int8Array): boolean {
    if (this.kind !== 'int8' || this.scale !== 0) return false;
    if (this.count + block.length > this.data.length) {
      this.grow(Math.max(this.count + block.length, this.data.length * 2));
    }
    (this.data as Int8Array).set(block, this.count);
    this.count += block.length;
    // Only widening needs the largest magnitude; it is found then (see widenFor), not block by block.
    this.maxAbsPending = true;
    return true;
  }

  /** The finished column, trimmed to its length. The builder must not be used afterwards. */
  finish(): EncodedColumn {
    const data = this.data.length === this.count ? this.data : this.data.slice(0, this.count);
    return { kind: this.kind, scale: this.scale, length: this.count, data };
  }

  private grow(capacity: number): void {
    const next = allocate(this.kind, capacity);
    next.set(this.data.subarray(0, this.count));
    this.data = next;
  }

  private widenFor(v: number): void {
    if (this.maxAbsPending) {
      let maxAbs = 0;
      const sentinel = SENTINELS[this.kind as IntKind];
      for (let i = 0; i < this.count; i++) {
        const raw = this.data[i];
        const abs = raw === sentinel ? 0 : raw < 0 ? -raw : raw;
        if (abs > maxAbs) maxAbs = abs;
      }
      this.maxAbs = maxAbs;
      this.maxAbsPending = false;
    }
    const s = exactScale(v, this.scale);
    if (s !== undefined) {
      const factor = POWERS[s] / POWERS[this.scale];
      const k = Math.abs(Math.round(v * POWERS[s]));
      const kind = intKindFor(Math.max(this.maxAbs * factor, k));
      if (kind !== undefined) {
        this.rebuild(kind, s);
        return;
      }
    }
    this.rebuild(this.allFitFloat32(v) ? 'float32' : 'float64', 0);
  }

  private allFitFloat32(v: number): boolean {
    if (Math.fround(v) !== v) return false;
    for (let i = 0; i < this.count; i++) {
      const x = this.valueAt(i);
      if (!Number.isNaN(x) && Math.fround(x) !== x) return false;
    }
    return true;
  }

  private valueAt(i: number): number {
    const raw = this.data[i];
    if (this.kind === 'float32' || this.kind === 'float64') return raw;
    if (raw === SENTINELS[this.kind as IntKind]) return Number.NaN;
    return this.scale === 0 ? raw : raw / POWERS[this.scale];
  }

  private rebuild(kind: ColumnKind, scale: number): void {
    const next = allocate(kind, this.data.length);
    let maxAbs = 0;
    for (let i = 0; i < this.count; i++) {
      const x = this.valueAt(i);
      if (kind === 'float32' || kind === 'float64') {
        next[i] = x;
      } else if (Number.isNaN(x)) {
        next[i] = SENTINELS[kind];
      } else {
        const k = Math.round(x * POWERS[scale]);
        if (Math.abs(k) > maxAbs) maxAbs = Math.abs(k);
        next[i] = k;
      }
    }
    this.kind = kind;
    this.scale = scale;
    this.maxAbs = maxAbs;
    this.maxAbsPending = false;
    this.data = next;
    this.intLimit = scale === 0 && kind !== 'float32' && kind !== 'float64' ? INT_LIMITS[kind] : 0;
  }
}

/**
 * Encodes a numeric column (NaN = missing) in the narrowest exact form; see the module comment.
 * Cost O(n) time, O(n · bytes per value) memory. Throws EngineError for ±Infinity.
 */
export function encodeColumn(values: ArrayLike<number>): EncodedColumn {
  const builder = new ColumnBuilder(values.length);
  for (let i = 0; i < values.length; i++) builder.push(values[i]);
  return builder.finish();
}

/**
 * Decodes an encoded column back to doubles, NaN for missing; exact inverse of encodeColumn.
 * Cost O(n).
 */
export function decodeColumn(column: EncodedColumn): Float64Array {
  const out = new Float64Array(column.length);
  const { data, kind } = column;
  if (kind === 'float32' || kind === 'float64') {
    out.set(data.subarray(0, column.length));
    return out;
  }
  const sentinel = SENTINELS[kind];
  const power = POWERS[column.scale];
  for (let i = 0; i < column.length; i++) {
    const raw = data[i];
    out[i] = raw === sentinel ? Number.NaN : column.scale === 0 ? raw : raw / power;
  }
  return out;
}

/** Number of missing values in an encoded column. Cost O(n). */
export function countMissing(column: EncodedColumn): number {
  const { data, kind } = column;
  let missing = 0;
  if (kind === 'float32' || kind === 'float64') {
    for (let i = 0; i < column.length; i++) if (Number.isNaN(data[i])) missing++;
  } else {
    const sentinel = SENTINELS[kind];
    for (let i = 0; i < column.length; i++) if (data[i] === sentinel) missing++;
  }
  return missing;
}

/** Serializes an encoded column into the byte form described in the module comment. Cost O(n). */
export function columnToBytes(column: EncodedColumn): Uint8Array {
  const width = BYTES_PER_VALUE[column.kind];
  const bytes = new Uint8Array(HEADER_BYTES + column.length * width);
  const view = new DataView(bytes.buffer);
  bytes.set(MAGIC, 0);
  view.setUint8(4, KIND_CODES[column.kind]);
  view.setUint8(5, column.scale);
  view.setUint32(8, column.length, true);
  const { data } = column;
  if (LITTLE_ENDIAN && column.kind !== 'float32' && column.kind !== 'float64') {
    bytes.set(new Uint8Array(data.buffer, data.byteOffset, column.length * width), HEADER_BYTES);
    return bytes;
  }
  let offset = HEADER_BYTES;
  switch (column.kind) {
    case 'int8':
      for (let i = 0; i < column.length; i++) view.setInt8(offset++, data[i]);
      break;
    case 'int16':
      for (let i = 0; i < column.length; i++, offset += 2) view.setInt16(offset, data[i], true);
      break;
    case 'int32':
      for (let i = 0; i < column.length; i++, offset += 4) view.setInt32(offset, data[i], true);
      break;
    case 'float32':
      for (let i = 0; i < column.length; i++, offset += 4) view.setFloat32(offset, data[i], true);
      break;
    case 'float64':
      for (let i = 0; i < column.length; i++, offset += 8) view.setFloat64(offset, data[i], true);
      break;
  }
  return bytes;
}

/**
 * Reads the byte form back into an encoded column. Cost O(n). Throws EngineError when the bytes do
 * not start with the magic, name an unknown kind or scale, or have the wrong length for their count.
 */
export function columnFromBytes(bytes: Uint8Array): EncodedColumn {
  if (bytes.length < HEADER_BYTES || MAGIC.some((m, i) => bytes[i] !== m)) {
    throw new EngineError('stored column is damaged: it does not start with the column header');
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const code = view.getUint8(4);
  const scale = view.getUint8(5);
  const length = view.getUint32(8, true);
  if (code < 1 || code > 5) throw new EngineError(`stored column is damaged: unknown value kind ${code}`);
  const kind = CODE_KINDS[code];
  if (scale > MAX_DECIMAL_SCALE || (scale > 0 && (kind === 'float32' || kind === 'float64'))) {
    throw new EngineError(`stored column is damaged: decimal scale ${scale} is not allowed for ${kind}`);
  }
  const width = BYTES_PER_VALUE[kind];
  if (bytes.length !== HEADER_BYTES + length * width) {
    throw new EngineError(
      `stored column is damaged: ${length} ${kind} values need ${HEADER_BYTES + length * width} bytes, found ${bytes.length}`,
    );
  }
  if (LITTLE_ENDIAN && kind !== 'float32' && kind !== 'float64') {
    const start = bytes.byteOffset + HEADER_BYTES;
    const copy = bytes.buffer.slice(start, start + length * width);
    const data =
      kind === 'int8' ? new Int8Array(copy) : kind === 'int16' ? new Int16Array(copy) : new Int32Array(copy);
    return { kind, scale, length, data };
  }
  const data = allocate(kind, length);
  let offset = HEADER_BYTES;
  switch (kind) {
    case 'int8':
      for (let i = 0; i < length; i++) data[i] = view.getInt8(offset++);
      break;
    case 'int16':
      for (let i = 0; i < length; i++, offset += 2) data[i] = view.getInt16(offset, true);
      break;
    case 'int32':
      for (let i = 0; i < length; i++, offset += 4) data[i] = view.getInt32(offset, true);
      break;
    case 'float32':
      for (let i = 0; i < length; i++, offset += 4) data[i] = view.getFloat32(offset, true);
      break;
    case 'float64':
      for (let i = 0; i < length; i++, offset += 8) data[i] = view.getFloat64(offset, true);
      break;
  }
  return { kind, scale, length, data };
}
