/** preprocess step → implementation. Adding a transform: one file here, one line below, one schema branch. */
import type { PreprocessStep } from '../protocol/types.js';
import { impute } from './impute.js';
import { log2p } from './log2p.js';
import { select } from './select.js';
import { standardize } from './standardize.js';
import type { TransformImpl } from './types.js';

export const transforms: Record<PreprocessStep['step'], TransformImpl<any>> = { standardize, log2p, impute, select };
