/** The repository gate's lock file, at the root of a locked repository. */
export const LOCK_FILE = 'foldseal.lock.json';
