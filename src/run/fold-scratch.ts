/**
 * One reusable buffer per thread for a fold's copy of its training rows. The copy lives only
 * until the fold's model is fitted (models keep their own parameters, never the matrix), and
 * fresh memory is costly: every page is zero-filled by the system on first touch, which on a
 * 4,500 × 200 fold took as long as the copy itself. The next fold on the thread writes over the
 * same pages. Only synchronous fits use it (fitFold); a copy larger than LIMIT is fresh memory,
 * so a thread never keeps a large buffer.
 */
const LIMIT = 64 << 20;

function scratch(): (length: number) => Float64Array {
  let spare: Float64Array | undefined;
  return (length) => {
    if (length * 8 > LIMIT) return new Float64Array(length);
    if (!spare || spare.length < length) spare = new Float64Array(length);
    return spare.subarray(0, length);
  };
}

export const foldScratch = scratch();

/** The same for a fold's copy of its test rows: predicting keeps nothing of them either. */
export const testScratch = scratch();
