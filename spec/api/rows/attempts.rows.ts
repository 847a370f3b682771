/** Access-matrix and bad-input rows of the attempts routes (see ./index.ts). */
import type { WriteRoute } from '../../support/bad-input-kit';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';

export const ATTEMPT_MATRIX: Record<string, Record<Caller, Expect>> = {};
export const ATTEMPT_REQUESTS: Record<string, MatrixRequest> = {};
export const ATTEMPT_BAD_INPUT: Record<string, WriteRoute> = {};
