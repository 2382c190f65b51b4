/**
 * gzip files are read as their decompressed bytes, recognized by their first two bytes (1f 8b,
 * RFC 1952) whatever their name; the SHA-256 a protocol records stays that of the bytes on disk,
 * so `sha256sum` still matches.
 */
import { gunzipSync } from 'node:zlib';
import { error, type Problem } from '../problems/problem.js';

/** The most decompressed bytes foldseal accepts (a table larger than this would not fit in memory anyway). */
const MAX_TEXT = 2 ** 31 - 1;

export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

export function decompressed(
  bytes: Uint8Array,
  shownAs: string,
  where: Partial<Problem> = {},
): { bytes: Uint8Array; problem?: undefined } | { problem: Problem } {
  if (!isGzip(bytes)) return { bytes };
  try {
    return { bytes: gunzipSync(bytes, { maxOutputLength: MAX_TEXT }) };
  } catch (e) {
    return {
      problem: error('data-bad-gzip', `file ${shownAs} starts like a gzip file but cannot be decompressed (${(e as Error).message})`, {
        ...where,
        hint: 'check the download; `gzip -t FILE` tests a gzip file',
      }),
    };
  }
}
