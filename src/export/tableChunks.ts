/**
 * Text tables as a sequence of byte chunks: a writer fills a fixed buffer with rows (numbers
 * written straight to ASCII by `writeNumber`) and hands it over each time it is nearly full, so a
 * table of millions of rows is never one string (V8 strings stop at 2^29 - 24 characters) and
 * memory stays at one chunk however long the table.
 */
import { MAX_NUMBER_BYTES, writeNumber } from "./formatNumber.js";

/** Bytes per chunk handed to the file: large enough that each write is cheap, small enough to stay in cache. */
export const CHUNK_BYTES = 1 << 18;

/** A re-readable sequence of byte chunks: each iteration runs the writer afresh. */
export type Chunks = Iterable<Uint8Array>;

/** Wraps a generator function so the chunks can be read more than once (a file, then a test). */
export function rereadable(make: () => Generator<Uint8Array>): Chunks {
  return { [Symbol.iterator]: () => make() };
}

/** The whole text of a chunk sequence (for small tables and tests; a huge table will not fit one string). */
export function chunksToText(chunks: Chunks): string {
  const decoder = new TextDecoder();
  let text = "";
  for (const c of chunks) text += decoder.decode(c, { stream: true });
  return text + decoder.decode();
}

/**
 * A buffer of rows of numbers: `num` appends one number and a separator, `end` closes a row;
 * `full()` says when to hand the chunk over with `take()`.
 */
export class RowBuffer {
  private buf = new Uint8Array(CHUNK_BYTES);
  private pos = 0;

  /** Bytes that one row may need at most, so `full()` leaves room for it. */
  constructor(private readonly rowBytes: number, private readonly nan: string) {
    if (rowBytes > CHUNK_BYTES / 2) this.buf = new Uint8Array(2 * rowBytes);
  }

  /** Appends ASCII text (short: a header fragment or a separator). */
  text(s: string): void {
    if (this.pos + 3 * s.length > this.buf.length) this.grow(3 * s.length);
    this.pos += new TextEncoder().encodeInto(s, this.buf.subarray(this.pos)).written;
  }

  /** Appends a number as formatNumber writes it, then the byte `sep` (44 comma, 10 newline, 0 none). */
  num(value: number, sep: number): void {
    this.pos = writeNumber(this.buf, this.pos, value, this.nan);
    if (sep !== 0) this.buf[this.pos++] = sep;
  }

  /** Appends one byte. */
  byte(b: number): void {
    this.buf[this.pos++] = b;
  }

  /** Whether the next row might not fit. */
  full(): boolean {
    return this.pos + this.rowBytes > this.buf.length;
  }

  /** The bytes so far (a copy), and an empty buffer. */
  take(): Uint8Array {
    const out = this.buf.slice(0, this.pos);
    this.pos = 0;
    return out;
  }

  get size(): number {
    return this.pos;
  }

  private grow(extra: number): void {
    const next = new Uint8Array(Math.max(2 * this.buf.length, this.pos + extra));
    next.set(this.buf.subarray(0, this.pos));
    this.buf = next;
  }
}

/** Bytes a row of `columns` numbers may take, separators included. */
export function rowBytes(columns: number): number {
  return columns * (MAX_NUMBER_BYTES + 1);
}
