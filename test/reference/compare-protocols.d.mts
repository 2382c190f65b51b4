/** Types of compare-protocols.mjs for the TypeScript tests. */
export function comparePair(): { a: string; b: string };
