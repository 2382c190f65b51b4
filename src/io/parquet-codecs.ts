/** Parquet page codecs: snappy by snappy.ts, gzip and Brotli by node:zlib; others are reported. */
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import type { Decompress } from './parquet-pages.js';
import { unsnappy } from './snappy.js';

/** For hyparquet's general reader: (compressed bytes, uncompressed size) → bytes. */
export const compressors = {
  SNAPPY: (input: Uint8Array, size: number) => unsnappy(input, new Uint8Array(size)),
  GZIP: (input: Uint8Array) => new Uint8Array(gunzipSync(input)),
  BROTLI: (input: Uint8Array) => new Uint8Array(brotliDecompressSync(input)),
};

/** For the fast path: into a reused buffer where the codec allows. */
export const decompress: Decompress = (bytes, into, codec) => {
  if (codec === 'SNAPPY') return unsnappy(bytes, into);
  const zlib = codec === 'GZIP' || codec === 'BROTLI' ? compressors[codec] : undefined;
  if (!zlib) throw new Error(`parquet unsupported compression codec: ${codec}`);
  const out = zlib(bytes);
  if (out.length !== into.length) throw new Error(`a page decompresses to ${out.length} bytes, its header says ${into.length}`);
  return out;
};
