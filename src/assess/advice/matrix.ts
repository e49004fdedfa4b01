/**
 * The advice matrix: codes in, codes out (rationale in docs/clinical-logic/advice.md). Kept as data so that it can be
 * read and reviewed as a table. Rows are the responsiveness verdict split by confidence; columns the tolerance.
 *
 *                 adequate              limited          poor                       not-known
 *   likely        proceed-and-reassess  smaller-aliquot  smaller-aliquot + options  smaller-aliquot
 *   likely-low    test-first            test-first       test-first                 test-first
 *   unlikely      question-bolus        question-bolus   question-bolus             question-bolus
 *   unlikely-low  test-first            test-first       test-first                 test-first
 *   indeterminate test-first            test-first       test-first                 test-first
 *
 * Before the matrix (advise-order.ts): early resuscitation of shock → resuscitate-and-reassess (never withdraw);
 * later, no fresh sign of hypoperfusion → question-need (never "give").
 */
import type { Tolerance } from '../types.js';
import type { AdviceAction, AlternativeCode, MatrixRow } from './types.js';

export interface MatrixEntry {
  action: AdviceAction;
  alternatives: AlternativeCode[];
}

const testFirst = (alternatives: AlternativeCode[]): MatrixEntry => ({ action: 'test-first', alternatives });
const question = (alternatives: AlternativeCode[]): MatrixEntry => ({ action: 'question-bolus', alternatives });
const UNLIKELY: AlternativeCode[] = ['vasoactive-by-picture', 'echo', 'cause'];

export const ADVICE_MATRIX: Record<MatrixRow, Record<Tolerance, MatrixEntry>> = {
  likely: {
    adequate: { action: 'proceed-and-reassess', alternatives: [] },
    limited: { action: 'smaller-aliquot', alternatives: ['smaller-aliquot'] },
    poor: { action: 'smaller-aliquot', alternatives: ['smaller-aliquot', 'vasopressor', 'albumin'] },
    'not-known': { action: 'smaller-aliquot', alternatives: ['smaller-aliquot'] },
  },
  'likely-low': {
    adequate: testFirst(['bolus-if-positive']),
    limited: testFirst(['bolus-if-positive', 'smaller-aliquot']),
    poor: testFirst(['vasopressor', 'albumin']),
    'not-known': testFirst(['bolus-if-positive']),
  },
  unlikely: {
    adequate: question(UNLIKELY),
    limited: question(UNLIKELY),
    poor: question([...UNLIKELY, 'fluid-removal']),
    'not-known': question(UNLIKELY),
  },
  'unlikely-low': {
    adequate: testFirst(['vasoactive-by-picture', 'echo']),
    limited: testFirst(['vasoactive-by-picture', 'echo']),
    poor: testFirst(['vasoactive-by-picture', 'echo', 'fluid-removal']),
    'not-known': testFirst(['vasoactive-by-picture', 'echo']),
  },
  indeterminate: {
    adequate: testFirst(['bolus-if-positive']),
    limited: testFirst(['bolus-if-positive', 'smaller-aliquot']),
    poor: testFirst(['vasopressor', 'albumin']),
    'not-known': testFirst(['bolus-if-positive']),
  },
};
