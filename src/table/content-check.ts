/**
 * Checks of a table's bytes before they are read as rows: a compressed or binary file is named
 * for what it is, and bytes that are not UTF-8 are an error at their line and column (the split
 * spec hashes ids as the bytes given; a reader that silently turned them into U+FFFD would hash
 * something else). Pure.
 */
import { isUtf8 } from 'node:buffer';
import { error, type Problem } from '../problems/problem.js';

export const SIGNATURES: [string, number[]][] = [
  ['gzip-compressed', [0x1f, 0x8b]],
  ['zip archive', [0x50, 0x4b, 0x03, 0x04]],
  ['bzip2-compressed', [0x42, 0x5a, 0x68]],
  ['xz-compressed', [0xfd, 0x37, 0x7a, 0x58, 0x5a, 0x00]],
  ['zstd-compressed', [0x28, 0xb5, 0x2f, 0xfd]],
  ['Parquet', [0x50, 0x41, 0x52, 0x31]],
  ['Excel (xls) or other OLE', [0xd0, 0xcf, 0x11, 0xe0]],
];

export function contentProblems(bytes: Uint8Array, file: string): Problem[] {
  const at = { file, position: { line: 1, col: 1 } };
  for (const [kind, magic] of SIGNATURES) {
    if (magic.every((b, i) => bytes[i] === b)) {
      return [
        error('data-not-a-table', `${file} looks like a ${kind} file, not a CSV or TSV table`, {
          ...at,
          hint:
            kind.endsWith('compressed') || kind === 'zip archive'
              ? 'decompress it first, then hash and name the decompressed file'
              : 'export it as CSV or TSV',
        }),
      ];
    }
  }
  const head = bytes.subarray(0, 8192);
  if (head.includes(0))
    return [error('data-not-a-table', `${file} holds NUL bytes, so it looks like a binary file, not a CSV or TSV table`, at)];
  if (isUtf8(bytes)) return [];
  const bad = firstInvalidUtf8(bytes);
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < bad; i++) {
    if (bytes[i] === 0x0a || (bytes[i] === 0x0d && bytes[i + 1] !== 0x0a)) {
      line++;
      lineStart = i + 1;
    }
  }
  const col = new TextDecoder().decode(bytes.subarray(lineStart, bad)).length + 1;
  return [
    error(
      'data-invalid-utf8',
      `byte ${bad + 1} (0x${bytes[bad].toString(16).padStart(2, '0')}) is not valid UTF-8; foldseal reads tables as UTF-8`,
      { file, position: { line, col }, hint: 'convert the file to UTF-8 (for example iconv -f latin1 -t utf-8)' },
    ),
  ];
}

/** Offset of the first byte that breaks UTF-8 (RFC 3629: no overlongs, no surrogates, at most U+10FFFF). */
export function firstInvalidUtf8(b: Uint8Array): number {
  let i = 0;
  while (i < b.length) {
    const c = b[i];
    if (c < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let min: number;
    if (c >= 0xc2 && c <= 0xdf) {
      need = 1;
      min = 0x80;
    } else if (c >= 0xe0 && c <= 0xef) {
      need = 2;
      min = 0x800;
    } else if (c >= 0xf0 && c <= 0xf4) {
      need = 3;
      min = 0x10000;
    } else return i;
    let cp = c & (0x3f >> need);
    for (let k = 1; k <= need; k++) {
      const d = b[i + k];
      if (d === undefined || (d & 0xc0) !== 0x80) return i;
      cp = (cp << 6) | (d & 0x3f);
    }
    if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return i;
    i += need + 1;
  }
  return -1;
}
