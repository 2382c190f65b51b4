/** Shared check of the kernel tests: a committed kernel module is what its WebAssembly text assembles to. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Test } from 'tap';
import { root } from '../helpers.js';

export async function committedKernelMatches(t: Test, name: string, committed: { watSha256: string; wasmBase64: string }): Promise<void> {
  const text = readFileSync(join(root, 'src', 'model', 'kernels', name), 'utf8');
  const { kernelModule } = await import(pathToFileURL(join(root, 'scripts', 'compile-wasm.mjs')).href);
  const expected: string = kernelModule(name, text);
  t.match(expected, committed.watSha256);
  t.match(expected, committed.wasmBase64);
}
