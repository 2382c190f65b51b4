/**
 * An ES-module package that foldseal loads only when needed (the report's chart libraries, the
 * browser driver). Through bin/foldseal.cjs the program runs as a script compiled by node:vm (with
 * its code cache), where Node 20 allows no import() without an experimental flag: the launcher
 * lends its own import under this symbol, and it is used when there.
 */
const LENT = Symbol.for('foldseal.importPackage');

export function importPackage<T>(name: string): Promise<T> {
  const lent = (globalThis as Record<symbol, unknown>)[LENT] as ((name: string) => Promise<unknown>) | undefined;
  return (lent ? lent(name) : import(name)) as Promise<T>;
}
