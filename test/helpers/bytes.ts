/** A string as UTF-8 bytes. */
export const utf8 = (s: string) => new TextEncoder().encode(s);

/**
 * The bytes as a stream of chunks of the given sizes, in turn (one chunk of everything when none are
 * given): how a reader meets a file arriving piece by piece.
 */
export async function* chunked(bytes: Uint8Array, sizes: readonly number[]): AsyncGenerator<Uint8Array> {
  let at = 0;
  let i = 0;
  while (at < bytes.length) {
    const size = Math.max(1, sizes.length > 0 ? sizes[i++ % sizes.length] : bytes.length);
    yield bytes.subarray(at, at + size);
    at += size;
  }
}
