/**
 * Rows of the bench's routes for the access matrix and the bad-input spec, one file per resource
 * group (each owned by the work that adds the routes), merged here.
 */
import type { Expect, Caller, MatrixRequest } from '../../support/matrix-kit';
import type { WriteRoute } from '../../support/bad-input-kit';
import { ATTEMPT_BAD_INPUT, ATTEMPT_MATRIX, ATTEMPT_REQUESTS } from './attempts.rows';
import { CLASS_BAD_INPUT, CLASS_MATRIX, CLASS_REQUESTS } from './classes.rows';
import { RECORD_BAD_INPUT, RECORD_MATRIX, RECORD_REQUESTS } from './records.rows';
import { SET_FILE_BAD_INPUT, SET_FILE_MATRIX, SET_FILE_REQUESTS } from './set-files.rows';
import { SET_BAD_INPUT, SET_MATRIX, SET_REQUESTS } from './sets.rows';

export const BENCH_MATRIX: Record<string, Record<Caller, Expect>> = { ...SET_MATRIX, ...RECORD_MATRIX, ...SET_FILE_MATRIX, ...CLASS_MATRIX, ...ATTEMPT_MATRIX };
export const BENCH_REQUESTS: Record<string, MatrixRequest> = { ...SET_REQUESTS, ...RECORD_REQUESTS, ...SET_FILE_REQUESTS, ...CLASS_REQUESTS, ...ATTEMPT_REQUESTS };
export const BENCH_BAD_INPUT: Record<string, WriteRoute> = { ...SET_BAD_INPUT, ...RECORD_BAD_INPUT, ...SET_FILE_BAD_INPUT, ...CLASS_BAD_INPUT, ...ATTEMPT_BAD_INPUT };
