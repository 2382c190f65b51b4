import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';

/** SHA-256 of a regular file's bytes, streamed (constant memory), as lower-case hex. A device, FIFO or socket is refused, never read. */
export async function sha256File(path: string): Promise<string> {
  const st = await stat(path);
  if (!st.isFile())
    throw Object.assign(new Error(st.isDirectory() ? 'is a folder' : 'not a plain file'), {
      code: st.isDirectory() ? 'EISDIR' : 'FOLDSEAL_NOT_REGULAR',
    });
  return new Promise((resolve, reject) => {
    const h = createHash('sha256');
    createReadStream(path, { highWaterMark: 1 << 20 })
      .on('data', (chunk) => h.update(chunk))
      .on('error', reject)
      .on('end', () => resolve(h.digest('hex')));
  });
}

export { sha256Bytes } from '../util/sha256.js';
