import { Arena, ownKernels } from '../engine/kernels/index.ts';

/** What splitting a piece of plain text stopped at (see PlainRecords.split). */
export interface PlainSplit {
  /** Records split into the field table. */
  count: number;
  /** Offset in the piece of the first line not counted. */
  at: number;
  /**
   * When the line at `at` is complete but not a plain data record (it is split into the next record
   * all the same): its field count, negated when every field is blank, and the offset after it.
   */
  stopped?: { fields: number; next: number };
}

/** Single-digit answers of a batch of records, read by item (see PlainRecords.gather). */
export interface GatheredDigits {
  /** Item j's values from values[j · capacity], NaN where missing or not yet read. */
  values: Float64Array;
  capacity: number;
  /** (record, item) of each cell left for the caller, in record order and item order within one. */
  slow: Int32Array;
  listed: number;
}

/**
 * The field table of a plain-text file's records (see FieldRows), made by the compiled kernels
 * splitLines and gatherDigits in an instance of their own, so that it lives while the reader awaits
 * the next chunk. Holds `capacity` records of `width` fields, and one piece of the file's bytes.
 */
export class PlainRecords {
  /** Byte offsets: width + 1 per record. Views of the kernels' memory, made again when it moves. */
  starts = new Int32Array(0);
  /** Single digit, FIELD_EMPTY or FIELD_OTHER: width per record. */
  digits = new Int8Array(0);
  private readonly k = ownKernels();
  private at = { bytes: 0, starts: 0, digits: 0, out: 0, columns: 0, table: 0, known: 0, values: 0, slow: 0 };
  private byteCapacity = -1;
  /** Items the gathering regions hold room for (sized at the first gather, by its item count). */
  private items = 0;
  private length = 0;

  constructor(
    readonly width: number,
    readonly capacity: number,
  ) {}

  /** Copies a piece of the file into the kernels' memory (the next split reads it). */
  load(piece: Uint8Array): void {
    if (piece.length > this.byteCapacity) this.layOut(Math.max(piece.length, 2 * this.byteCapacity));
    new Uint8Array(this.k.memory.buffer, this.at.bytes, piece.length).set(piece);
    this.length = piece.length;
  }

  /**
   * Splits the loaded piece's lines from `from` into records `slot` on (splitLines), while they are
   * plain data records and there is room; a last line without a line feed counts only when `final`.
   */
  split(from: number, final: boolean, delimiter: number, slot: number): PlainSplit {
    const { at, width, capacity } = this;
    const count = this.k.splitLines(
      at.bytes,
      from,
      this.length,
      final,
      delimiter,
      width,
      slot,
      capacity,
      at.starts,
      at.digits,
      at.out,
    );
    const out = new Int32Array(this.k.memory.buffer, at.out, 4);
    return { count, at: out[0], stopped: out[3] === 1 ? { fields: out[1], next: out[2] } : undefined };
  }

  /**
   * Reads the single digits of records [0, n) in the given header columns (at most width of them):
   * digit d is table[d] where known[d] is 1; an empty field is NaN; every other cell is listed.
   */
  gather(n: number, columns: readonly number[], table: Float64Array, known: Uint8Array): GatheredDigits {
    if (columns.length > this.items) this.layOut(this.byteCapacity, columns.length);
    const { at, width, capacity } = this;
    const buffer = this.k.memory.buffer;
    new Int32Array(buffer, at.columns, columns.length).set(columns);
    new Float64Array(buffer, at.table, 10).set(table);
    new Uint8Array(buffer, at.known, 10).set(known);
    const listed = this.k.gatherDigits(
      at.digits,
      n,
      width,
      at.columns,
      columns.length,
      at.table,
      at.known,
      capacity,
      at.values,
      at.slow,
    );
    return {
      values: new Float64Array(buffer, at.values, columns.length * capacity),
      capacity,
      slow: new Int32Array(buffer, at.slow, 2 * listed),
      listed,
    };
  }

  /**
   * Places the tables, room for `bytes` bytes of the file and the gathering of `items` items. Every
   * region is written before it is read, so none is cleared: with the same `bytes`, the regions up to
   * the file's bytes keep their places and contents (a gather may widen its regions in mid-batch).
   */
  private layOut(bytes: number, items = this.items): void {
    const { width, capacity } = this;
    const arena = new Arena(this.k);
    this.at = {
      starts: arena.i32(capacity * (width + 1), true),
      digits: arena.u8(capacity * width, true),
      out: arena.i32(4, true),
      columns: arena.i32(width, true),
      table: arena.f64(10, true),
      known: arena.u8(10, true),
      bytes: arena.u8(bytes, true),
      values: arena.f64(capacity * items, true),
      slow: arena.i32(2 * capacity * items, true),
    };
    const buffer = arena.ready();
    this.byteCapacity = bytes;
    this.items = items;
    this.starts = new Int32Array(buffer, this.at.starts, capacity * (width + 1));
    this.digits = new Int8Array(buffer, this.at.digits, capacity * width);
  }
}
