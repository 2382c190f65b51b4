/** SHA-256 of bytes or a string (UTF-8), as lower-case hex. Pure: hashing reads nothing. */
import { createHash } from 'node:crypto';

export function sha256Bytes(bytes: Uint8Array | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}
