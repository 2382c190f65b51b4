/** FOLDSEAL_THREADS: a positive integer forces that many threads (1 = none besides this one). */
export function forcedThreads(): number | undefined {
  const forced = Number(process.env.FOLDSEAL_THREADS);
  return Number.isInteger(forced) && forced >= 1 ? forced : undefined;
}
