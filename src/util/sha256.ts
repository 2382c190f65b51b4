/** SHA-256 of bytes or a string (UTF-8), as lower-case hex. Pure: hashing reads nothing. */
import { createHash } from 'node:crypto';

export function sha256Bytes(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** SHA-256 of the pieces' bytes, in order (a file made piece by piece is hashed without being held whole). */
export function sha256Pieces(pieces: Iterable<Uint8Array>): string {
  const hash = createHash('sha256');
  for (const piece of pieces) hash.update(piece);
  return hash.digest('hex');
}
