/** Whether bytes are a Parquet file: "PAR1" at both ends (checked before the decoder is loaded). */
export function isParquet(bytes: Uint8Array): boolean {
  const n = bytes.length;
  const par1 = (i: number) => bytes[i] === 0x50 && bytes[i + 1] === 0x41 && bytes[i + 2] === 0x52 && bytes[i + 3] === 0x31;
  return n >= 12 && par1(0) && par1(n - 4);
}
