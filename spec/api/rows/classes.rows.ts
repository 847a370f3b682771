/** Access-matrix and bad-input rows of the classes routes (see ./index.ts). */
import type { WriteRoute } from '../../support/bad-input-kit';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';

export const CLASS_MATRIX: Record<string, Record<Caller, Expect>> = {};
export const CLASS_REQUESTS: Record<string, MatrixRequest> = {};
export const CLASS_BAD_INPUT: Record<string, WriteRoute> = {};
