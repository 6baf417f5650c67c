/**
 * Exact ArrayBuffer copy of the bytes of a Uint8Array (or of a string as Latin-1 bytes).
 * Node's small Buffers are views into a shared 8 KiB pool, so `buf.buffer` would hand a parser
 * bytes of other files (the pooled-Buffer pitfall); slicing by byteOffset avoids it.
 */
export function exactArrayBuffer(data: Uint8Array | string): ArrayBuffer {
  if (typeof data === "string") return new TextEncoder().encode(data).buffer as ArrayBuffer;
  return data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength) as ArrayBuffer;
}

/** The data as text (UTF-8). */
export function asText(data: Uint8Array | string): string {
  return typeof data === "string" ? data : new TextDecoder().decode(data);
}

/** The data as bytes (UTF-8 for strings). */
export function asBytes(data: Uint8Array | string): Uint8Array {
  return typeof data === "string" ? new TextEncoder().encode(data) : data;
}
