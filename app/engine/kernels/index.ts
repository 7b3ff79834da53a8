import { EngineError } from '../errors.ts';
import { KERNELS_WASM_BASE64 } from './binary.ts';

/**
 * The engine's compiled kernels (assembly/index.ts, built by build.mjs into binary.ts): the inner
 * loops of the pairwise moments, column summaries, answer tally, eigen and LU decompositions and the
 * splitting of plain-text records, as WebAssembly. Each kernel performs
 * the same double-precision operations in the same order as the TypeScript it replaced, so its results
 * are the same to the last bit; it runs compiled from its first call instead of waiting for the
 * JavaScript engine to warm up, and sums two products per instruction where the order allows it.
 *
 * One shared instance per thread, made on first use. Callers lay out their arrays in its memory with
 * an Arena, copy their inputs in, call the kernels, and read the results before the next layout.
 */
export interface KernelExports {
  memory: WebAssembly.Memory;
  heapBase(): number;
  scanColumn(col: number, n: number, out: number): number;
  /** One block of rows of the pairwise pass; `layout` as pairwiseLayout writes it. */
  pairwiseBlock(layout: number, start: number, rows: number): void;
  describePair(a: number, b: number, n: number, scratchA: number, scratchB: number, out: number): void;
  countNear(col: number, n: number, value: number, tolerance: number): number;
  tallyColumn(col: number, n: number, answered: number): number;
  symmetricEigen(n: number, v: number, d: number, e: number): void;
  luFactor(n: number, lu: number, pivot: number, column: number): void;
  luSolve(n: number, m: number, lu: number, x: number): void;
  splitLines(
    bytes: number,
    from: number,
    len: number,
    final: boolean,
    delimiter: number,
    width: number,
    slot: number,
    capacity: number,
    starts: number,
    digits: number,
    out: number,
  ): number;
  gatherDigits(
    digits: number,
    n: number,
    width: number,
    columns: number,
    k: number,
    table: number,
    known: number,
    capacity: number,
    values: number,
    slow: number,
  ): number;
}

let compiled: WebAssembly.Module | undefined;
let shared: KernelExports | undefined;

/** A new instance of the kernels, with a memory of its own (the module is compiled once per thread). */
export function ownKernels(): KernelExports {
  if (compiled === undefined) {
    const text = atob(KERNELS_WASM_BASE64);
    const bytes = new Uint8Array(text.length);
    for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
    compiled = new WebAssembly.Module(bytes);
  }
  return new WebAssembly.Instance(compiled).exports as unknown as KernelExports;
}

/** This thread's shared instance of the kernels, made on first use. */
export function kernels(): KernelExports {
  shared ??= ownKernels();
  return shared;
}

const WASM_PAGE = 65_536;

/** The newest Arena of each instance, by number: an older one's memory may since have been reused. */
const epochs = new WeakMap<KernelExports, number>();

/**
 * Places arrays in the kernels' memory one after another (each on a 16-byte boundary), from the end
 * of the module's own data; `ready` grows the memory to hold them (after it, views made before may be
 * stale: make them again). More may be placed after a `ready`, and readied in turn. Every Arena on the
 * shared instance starts at the same place, so one such layout is in use at a time: right for a
 * computation that runs to its end without yielding (the kernels run synchronously and do not call
 * back). A layout that must live across awaits (a reader going through a file) is made in an instance
 * of its own (ownKernels).
 */
export class Arena {
  private top: number;
  private readonly epoch: number;

  constructor(readonly k: KernelExports = kernels()) {
    this.top = align(this.k.heapBase());
    this.epoch = (epochs.get(k) ?? 0) + 1;
    epochs.set(k, this.epoch);
  }

  /** Whether no later Arena has been laid out over this one (its arrays still hold what was put there). */
  get current(): boolean {
    return epochs.get(this.k) === this.epoch;
  }

  private readonly zeroed: [number, number][] = [];

  /** Room for `count` doubles, zero unless `filled` (the caller writes every one); the byte offset. */
  f64(count: number, filled = false): number {
    return this.take(count * 8, filled);
  }

  /** Room for `count` bytes, zero unless `filled`; returns the byte offset. */
  u8(count: number, filled = false): number {
    return this.take(count, filled);
  }

  /** Room for `count` 32-bit integers, zero unless `filled`; returns the byte offset. */
  i32(count: number, filled = false): number {
    return this.take(count * 4, filled);
  }

  /** Grows the memory to hold everything placed, zeroes what must start at zero, returns the buffer. */
  ready(): ArrayBuffer {
    const { memory } = this.k;
    const short = this.top - memory.buffer.byteLength;
    if (short > 0) memory.grow(Math.ceil(short / WASM_PAGE));
    for (const [at, bytes] of this.zeroed) new Uint8Array(memory.buffer, at, bytes).fill(0);
    this.zeroed.length = 0;
    return memory.buffer;
  }

  private take(bytes: number, filled: boolean): number {
    const at = this.top;
    this.top = align(at + bytes);
    if (!filled) this.zeroed.push([at, this.top - at]);
    return at;
  }
}

function align(offset: number): number {
  return Math.ceil(offset / 16) * 16;
}

/**
 * Columns of equal length copied once into an Arena, so that several kernels in a row read them where
 * they are; `source` keeps the columns as given. Later layouts of the same computation go on in `arena`.
 */
export interface ResidentColumns {
  readonly arena: Arena;
  /** Values per column. */
  readonly n: number;
  readonly source: readonly Float64Array[];
  /** Byte offset of column j: base + j·n·8. */
  readonly base: number;
}

/**
 * Copies columns (each of columns[0]'s length) into a new Arena on the shared instance. Cost O(n·p).
 * Throws EngineError ('shape') for a column of another length: it would leave part of its place to
 * what the memory held before, or run into the next column's place.
 */
export function residentColumns(columns: readonly Float64Array[]): ResidentColumns {
  const n = columns[0]?.length ?? 0;
  columns.forEach((column, j) => {
    if (column.length !== n) {
      throw new EngineError(
        `columns must be of equal length; column index ${j} has ${column.length} values, column index 0 has ${n}`,
        'shape',
      );
    }
  });
  const arena = new Arena();
  const base = arena.f64(n * columns.length, true);
  const all = new Float64Array(arena.ready(), base, n * columns.length);
  columns.forEach((column, j) => {
    all.set(column, j * n);
  });
  return { arena, n, source: columns, base };
}

/** Columns already resident, if their Arena is still the current one; else copied in (residentColumns). */
export function asResident(columns: readonly Float64Array[] | ResidentColumns): ResidentColumns {
  if (!('base' in columns)) return residentColumns(columns);
  return columns.arena.current ? columns : residentColumns(columns.source);
}
