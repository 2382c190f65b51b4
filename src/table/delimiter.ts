/** The delimiter of a plain table: the protocol's format, else the file's extension (.tsv, .tab: tab; anything else: comma). */
export function delimiterFor(file: string, format?: 'csv' | 'tsv'): number {
  const f = format ?? (/\.(tsv|tab)(\.gz)?$/i.test(file) ? 'tsv' : 'csv');
  return f === 'tsv' ? 0x09 : 0x2c;
}
