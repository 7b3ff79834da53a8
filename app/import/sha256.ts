import { createHash } from 'node:crypto';

/**
 * SHA-256 of a file's bytes as 64 lower-case hex digits: the digest every stored file (item pool,
 * ratings, response data) and every command's report carries. Streaming readers hash piece by piece
 * with node:crypto's incremental hash and must give the same digest.
 */
export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}
