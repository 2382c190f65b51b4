/**
 * SHA-256 (FIPS 180-4) for the many short messages of split-key derivation: 100,000 ids are
 * 100,000 digests, and a call into node:crypto costs more than hashing one 64-byte block here.
 * Works in place on caller-owned buffers, so deriving keys allocates nothing per id. Large
 * inputs (files) still go through node:crypto.
 */
const K = Int32Array.from([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5, 0xd807aa98, 0x12835b01, 0x243185be,
  0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174, 0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa,
  0x5cb0a9dc, 0x76f988da, 0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967, 0x27b70a85,
  0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85, 0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3,
  0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070, 0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f,
  0x682e6ff3, 0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2,
]);
const INITIAL = Int32Array.from([0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19]);

export class ShortHasher {
  private readonly w = new Int32Array(64);
  private readonly h = new Int32Array(8);
  /** Callers may write a message straight into this buffer and call digestBlockInto. */
  block = new Uint8Array(128);

  /** Writes SHA-256(message[0, length)) to out[offset, offset + 32). */
  digestInto(message: Uint8Array, length: number, out: Uint8Array, offset: number): void {
    this.reserve(length);
    this.block.set(message.subarray(0, length));
    this.digestBlockInto(length, out, offset);
  }

  /** Makes room for a message of `length` bytes in `block` (keeping what is there). */
  reserve(length: number): void {
    const size = (Math.floor((length + 8) / 64) + 1) * 64;
    if (this.block.length < size) {
      const grown = new Uint8Array(size * 2);
      grown.set(this.block);
      this.block = grown;
    }
  }

  /** SHA-256 of block[0, length) (reserve(length) first) to out[offset, offset + 32). */
  digestBlockInto(length: number, out: Uint8Array, offset: number): void {
    const blocks = Math.floor((length + 8) / 64) + 1;
    const block = this.block;
    const end = blocks * 64;
    block[length] = 0x80;
    block.fill(0, length + 1, end - 4);
    // Message length in bits, big-endian, in the last 8 bytes (lengths here stay far below 2^32 bits).
    const bits = length * 8;
    block[end - 4] = bits >>> 24;
    block[end - 3] = (bits >>> 16) & 0xff;
    block[end - 2] = (bits >>> 8) & 0xff;
    block[end - 1] = bits & 0xff;
    const h = this.h;
    h.set(INITIAL);
    for (let b = 0; b < blocks; b++) this.compress(block, b * 64);
    for (let i = 0; i < 8; i++) {
      const v = h[i];
      const o = offset + i * 4;
      out[o] = v >>> 24;
      out[o + 1] = (v >>> 16) & 0xff;
      out[o + 2] = (v >>> 8) & 0xff;
      out[o + 3] = v & 0xff;
    }
  }

  private compress(block: Uint8Array, at: number): void {
    const w = this.w;
    const h = this.h;
    for (let i = 0; i < 16; i++) {
      const o = at + i * 4;
      w[i] = (block[o] << 24) | (block[o + 1] << 16) | (block[o + 2] << 8) | block[o + 3];
    }
    for (let i = 16; i < 64; i++) {
      const x = w[i - 15];
      const y = w[i - 2];
      const s0 = ((x >>> 7) | (x << 25)) ^ ((x >>> 18) | (x << 14)) ^ (x >>> 3);
      const s1 = ((y >>> 17) | (y << 15)) ^ ((y >>> 19) | (y << 13)) ^ (y >>> 10);
      w[i] = (w[i - 16] + s0 + w[i - 7] + s1) | 0;
    }
    let a = h[0],
      b = h[1],
      c = h[2],
      d = h[3],
      e = h[4],
      f = h[5],
      g = h[6],
      k = h[7];
    for (let i = 0; i < 64; i++) {
      const S1 = ((e >>> 6) | (e << 26)) ^ ((e >>> 11) | (e << 21)) ^ ((e >>> 25) | (e << 7));
      const ch = (e & f) ^ (~e & g);
      const t1 = (k + S1 + ch + K[i] + w[i]) | 0;
      const S0 = ((a >>> 2) | (a << 30)) ^ ((a >>> 13) | (a << 19)) ^ ((a >>> 22) | (a << 10));
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const t2 = (S0 + maj) | 0;
      k = g;
      g = f;
      f = e;
      e = (d + t1) | 0;
      d = c;
      c = b;
      b = a;
      a = (t1 + t2) | 0;
    }
    h[0] = (h[0] + a) | 0;
    h[1] = (h[1] + b) | 0;
    h[2] = (h[2] + c) | 0;
    h[3] = (h[3] + d) | 0;
    h[4] = (h[4] + e) | 0;
    h[5] = (h[5] + f) | 0;
    h[6] = (h[6] + g) | 0;
    h[7] = (h[7] + k) | 0;
  }
}
