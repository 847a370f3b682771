/** Access-matrix and bad-input rows of the records routes (see ./index.ts). */
import type { WriteRoute } from '../../support/bad-input-kit';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';

export const RECORD_MATRIX: Record<string, Record<Caller, Expect>> = {};
export const RECORD_REQUESTS: Record<string, MatrixRequest> = {};
export const RECORD_BAD_INPUT: Record<string, WriteRoute> = {};
