/**
 * The API words of DESIGN.md §2 ("API words" table), as TypeScript types and value lists.
 * Kebab-case on the wire and in code; screens show the word beside (see VERDICT_LABELS).
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */

export const VERDICTS = ['in-band', 'near-limit', 'high', 'low', 'open', 'short', 'inconclusive', 'not-read'] as const;
export type Verdict = (typeof VERDICTS)[number];

/** Reasons carried by `inconclusive` and `not-read` verdicts. */
export const VERDICT_REASONS = [
  'guard-band',
  'meter-cannot-decide',
  'climbing',
  'unstable',
  'unexplained-in-circuit',
  'over-range',
  'no-access',
] as const;
export type VerdictReason = (typeof VERDICT_REASONS)[number];

/** Side of an inconclusive verdict under the guarded rule (ILAC-G8:09/2019 §4.2.3). */
export const SIDES = ['conditional-pass', 'conditional-fail'] as const;
export type Side = (typeof SIDES)[number];

export const BAND_SOURCES = ['critical', 'template', 'allowance'] as const;
export type BandSource = (typeof BAND_SOURCES)[number];

export const VALUE_SOURCES = ['service-data', 'known-good-set', 'schematic'] as const;
export type ValueSource = (typeof VALUE_SOURCES)[number];

export const READING_STATES = ['value', 'open', 'over-range', 'short', 'climbing', 'unstable', 'no-access'] as const;
export type ReadingState = (typeof READING_STATES)[number];

export const METHODS = ['in-circuit', 'lead-lifted', 'out-of-circuit'] as const;
export type Method = (typeof METHODS)[number];

export const SURVEY_PURPOSES = ['intake', 'after-repair', 'periodic', 'assignment'] as const;
export type SurveyPurpose = (typeof SURVEY_PURPOSES)[number];

export const SURVEY_STATES = ['draft', 'complete', 'submitted', 'returned', 'accepted'] as const;
export type SurveyState = (typeof SURVEY_STATES)[number];

export const TEMPLATE_VERSION_STATES = ['draft', 'published', 'retired'] as const;
export type TemplateVersionState = (typeof TEMPLATE_VERSION_STATES)[number];

export const DECISION_RULES = ['simple', 'guarded'] as const;
export type DecisionRule = (typeof DECISION_RULES)[number];

/** Component kinds (DESIGN.md §2 "component"). */
export const COMPONENT_KINDS = [
  'carbon-composition',
  'carbon-film',
  'metal-film',
  'wirewound',
  'pot',
  'winding',
  'heater',
  'lamp',
  'ballast',
  'thermistor',
  'fuse',
  'capacitor',
  'rectifier',
] as const;
export type ComponentKind = (typeof COMPONENT_KINDS)[number];

/**
 * Kinds that are non-linear or open at DC: left out of the chassis network and their test points
 * excluded from the in-circuit reasoning (DESIGN.md §2 "component", §3.5). Thermistors, ballasts,
 * lamps and heaters read as (cold) resistances at an ohmmeter's small test current: they stay in.
 */
export const NON_NETWORK_KINDS: readonly ComponentKind[] = ['capacitor', 'rectifier'];

/** Kinds judged by continuity only (DESIGN.md §3.4): DC resistance cannot show shorted turns. */
export const CONTINUITY_KINDS: readonly ComponentKind[] = ['heater', 'lamp', 'winding'];

/** The order in which verdicts are summed up: the worst counts (DESIGN.md §2 "verdict"). */
export const VERDICT_SEVERITY: Readonly<Record<Verdict, number>> = {
  open: 5,
  short: 5,
  high: 4,
  low: 4,
  inconclusive: 3,
  'near-limit': 2,
  'in-band': 1,
  'not-read': 0,
};

/** Screen words for verdicts (never shown by colour alone: a glyph goes with each). */
export const VERDICT_LABELS: Readonly<Record<Verdict, string>> = {
  'in-band': 'in band',
  'near-limit': 'near limit',
  high: 'high',
  low: 'low',
  open: 'open',
  short: 'short',
  inconclusive: 'inconclusive',
  'not-read': 'not read',
};

/** Worst of several verdicts (stage summary, pair relation). `not-read` when the list is empty. */
export function worstVerdict(verdicts: Iterable<Verdict>): Verdict {
  let worst: Verdict = 'not-read';
  for (const v of verdicts) if (VERDICT_SEVERITY[v] > VERDICT_SEVERITY[worst]) worst = v;
  return worst;
}
