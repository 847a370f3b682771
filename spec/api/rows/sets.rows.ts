/** Access-matrix and bad-input rows of the sets routes (see ./index.ts). */
import type { WriteRoute } from '../../support/bad-input-kit';
import type { Caller, Expect, MatrixRequest } from '../../support/matrix-kit';

export const SET_MATRIX: Record<string, Record<Caller, Expect>> = {};
export const SET_REQUESTS: Record<string, MatrixRequest> = {};
export const SET_BAD_INPUT: Record<string, WriteRoute> = {};
