import type { BandBasis } from '@domain/verdict';
import type { DecisionRule, Side, VerdictReason } from '@domain/words';

/** Screen words of the quick check for the API words it shows (DESIGN.md §2). */
export const REASON_LABELS: Readonly<Record<VerdictReason, string>> = {
  'guard-band': 'within the guard band of a limit',
  'meter-cannot-decide': 'this meter cannot decide this band',
  climbing: 'the reading was climbing (a capacitor charging from the meter)',
  unstable: 'the reading was unstable',
  'unexplained-in-circuit': 'not explained in circuit: lift a lead to decide',
  'over-range': 'over range: take a higher range',
  'no-access': 'no access to the test point',
};

export const SIDE_LABELS: Readonly<Record<Side, string>> = {
  'conditional-pass': 'conditional pass',
  'conditional-fail': 'conditional fail',
};

export const DECISION_LABELS: Readonly<Record<DecisionRule, string>> = {
  simple: 'simple (the reading decides)',
  guarded: 'guarded (guard band of U at each limit)',
};

export const BASIS_LABELS: Readonly<Record<BandBasis, string>> = {
  critical: 'a critical position’s own band',
  'template-band': 'the template’s asymmetric band',
  'template-tolerance': 'the marked tolerance',
  'default-tolerance': 'no tolerance given, so ±20 % (no tolerance band)',
  allowance: 'the restoration allowance',
  'default-allowance': 'the default restoration allowance',
  continuity: 'the wide continuity band',
  'expected-open': 'the open threshold',
  'expected-short': 'the short threshold',
};
