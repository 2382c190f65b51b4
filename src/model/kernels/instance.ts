/**
 * One WebAssembly kernel instance per thread, made from a committed module (kernels/*.wasm.ts),
 * and its memory grown on request. Null where WebAssembly is not available (node --jitless):
 * the callers then take their plain JavaScript loops, which give the same bits.
 */
export interface Kernel {
  memory: WebAssembly.Memory;
}

export function instantiate<K extends Kernel>(wasmBase64: string): K | null {
  if (typeof WebAssembly !== 'object') return null;
  const bytes = Uint8Array.from(atob(wasmBase64), (c) => c.charCodeAt(0));
  const { exports } = new WebAssembly.Instance(new WebAssembly.Module(bytes));
  return exports as unknown as K;
}

/** Grows the memory to at least `bytes`; false when the system refuses (the caller's plain loop needs none of it). */
export function reserve(memory: WebAssembly.Memory, bytes: number): boolean {
  const pages = Math.ceil(bytes / 65536) - memory.buffer.byteLength / 65536;
  if (pages <= 0) return true;
  try {
    memory.grow(pages);
    return true;
  } catch {
    /* c8 ignore next -- the system refused the memory; not reproducible in a test */
    return false;
  }
}
