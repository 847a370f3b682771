import { inferRange } from '@domain/meter';
import { parseResistance, type ParseSuccess } from '@domain/notation';
import { QuickCheckError, checkReading, type VerdictRequest, type VerdictResponse } from '@domain/quick-check';
import type { DecisionRule } from '@domain/words';
import { parsePlainNumber } from '../calc-format';
import { sameNumber } from '../confirmation';
import type { MeterChoice } from '../meter-editor/meter-form';

export type ToleranceChoice = 'marked' | '5' | '10' | '20' | 'custom' | 'allowance';

/** The reading form's raw value: everything as typed. */
export interface ReadingFormValue {
  nominal: string;
  tolerance: ToleranceChoice;
  customPct: string;
  allowanceBelowPct: string;
  allowanceAbovePct: string;
  reading: string;
  decision: DecisionRule;
  nearLimitFraction: string;
}

export type ReadingField = 'nominal' | 'customPct' | 'allowanceBelowPct' | 'allowanceAbovePct' | 'reading' | 'nearLimitFraction' | 'tolerance';

export interface FieldProblem {
  /** The form field at fault, or `form` when the message belongs to no one field. */
  readonly field: ReadingField | 'form';
  readonly message: string;
}

export type LocalCheck =
  | { readonly ok: true; readonly request: VerdictRequest; readonly response: VerdictResponse; readonly nominal: ParseSuccess }
  | { readonly ok: false; readonly problems: readonly FieldProblem[]; readonly nominal: ParseSuccess | null };

/** Domain field names (QuickCheckError.field) → the form field that shows the message. */
function fieldOf(domainField: string): ReadingField | 'form' {
  if (domainField === 'reading') return 'reading';
  if (domainField === 'expected') return 'nominal';
  if (domainField === 'tolerancePct') return 'customPct';
  if (domainField === 'rule.allowance.lowPct') return 'allowanceBelowPct';
  if (domainField === 'rule.allowance.highPct' || domainField.startsWith('rule.allowance')) return 'allowanceAbovePct';
  if (domainField === 'rule.nearLimitFraction') return 'nearLimitFraction';
  return 'form';
}

/**
 * The form as a `POST /api/calc/verdict` request, judged at once with the same function the API
 * calls (`checkReading`). Problems name the field that shows them, in the domain's own words.
 */
export function localCheck(v: ReadingFormValue, meter: MeterChoice | null): LocalCheck {
  const problems: FieldProblem[] = [];
  const nominalParse = parseResistance(v.nominal);
  let nominal: ParseSuccess | null = null;
  let expected: VerdictRequest['expected'] | null = null;
  if (!nominalParse.ok) problems.push({ field: 'nominal', message: nominalParse.message });
  else {
    nominal = nominalParse;
    if (nominalParse.state === 'value' && nominalParse.ohms !== null && nominalParse.ohms > 0) expected = nominalParse.ohms;
    else if (nominalParse.state === 'open' || nominalParse.state === 'short') expected = nominalParse.state;
    else problems.push({ field: 'nominal', message: `'${v.nominal}': a nominal is a value above 0 Ω (4k7, 470R, 2 meg), or open or short` });
  }

  const request: Omit<VerdictRequest, 'expected'> = {
    reading: v.reading,
    rule: { decision: v.decision, nearLimitFraction: 0.75, bandFrom: 'template' },
  };
  const fraction = parsePlainNumber(v.nearLimitFraction);
  if (fraction === null || !(fraction > 0 && fraction <= 1)) problems.push({ field: 'nearLimitFraction', message: 'the near-limit fraction is above 0 and at most 1 (0.75 is usual)' });
  else request.rule!.nearLimitFraction = fraction;

  switch (v.tolerance) {
    case 'marked':
      if (nominal && nominal.tolerancePct === null) problems.push({ field: 'tolerance', message: 'the nominal carries no tolerance (a letter such as J or K, or ±10 %): choose one' });
      else if (nominal && nominal.tolerancePct !== null) request.tolerancePct = nominal.tolerancePct;
      break;
    case 'custom': {
      const pct = parsePlainNumber(v.customPct);
      if (pct === null || !(pct > 0 && pct < 100)) problems.push({ field: 'customPct', message: 'a tolerance is a percentage above 0 and below 100' });
      else request.tolerancePct = pct;
      break;
    }
    case 'allowance': {
      const below = parsePlainNumber(v.allowanceBelowPct);
      const above = parsePlainNumber(v.allowanceAbovePct);
      if (below === null || !(below >= 0 && below < 100)) problems.push({ field: 'allowanceBelowPct', message: 'percent below the nominal: 0 up to (not including) 100' });
      if (above === null || !(above >= 0)) problems.push({ field: 'allowanceAbovePct', message: 'percent above the nominal: 0 or more' });
      if (below !== null && above !== null && below >= 0 && below < 100 && above >= 0) {
        if (below === 0 && above === 0) problems.push({ field: 'allowanceAbovePct', message: 'an allowance needs some width' });
        else request.rule = { ...request.rule!, bandFrom: 'allowance', allowance: { lowPct: below === 0 ? 0 : -below, highPct: above } };
      }
      break;
    }
    default:
      request.tolerancePct = Number(v.tolerance);
  }
  if (meter) {
    request.meter = meter.meter;
    if (meter.rangeIndex !== undefined) request.rangeIndex = meter.rangeIndex;
  }

  if (expected === null || problems.length > 0) {
    // Still say what is wrong with the reading, so both fields show their problem at once.
    if (!problems.some((p) => p.field === 'reading')) {
      const reading = parseResistance(v.reading, readingParseOptions(meter));
      if (!reading.ok) problems.push({ field: 'reading', message: reading.message });
    }
    return { ok: false, problems, nominal };
  }
  const full: VerdictRequest = { expected, ...request };
  try {
    return { ok: true, request: full, response: checkReading(full), nominal: nominal! };
  } catch (e) {
    if (e instanceof QuickCheckError) return { ok: false, problems: [{ field: fieldOf(e.field), message: e.message }], nominal };
    throw e;
  }
}

/** As `checkReading` parses a reading: the meter's lead and the resolution of the smallest (or recorded) range. */
function readingParseOptions(meter: MeterChoice | null): { leadOhms?: number; resolutionOhms?: number } {
  if (!meter) return {};
  const m = meter.meter;
  if (m.kind !== 'digital') return { leadOhms: m.leadOhms };
  const i = meter.rangeIndex ?? inferRange(m, 0);
  return { leadOhms: m.leadOhms, resolutionOhms: m.ranges[i]?.resolutionOhms };
}

/** Where the server's verdict differs from this page's, in words (empty: they agree). */
export function verdictDifferences(local: VerdictResponse, server: VerdictResponse): string[] {
  const out: string[] = [];
  if (local.verdict !== server.verdict) out.push(`the server says ${server.verdict}, this page ${local.verdict}`);
  if (local.reason !== server.reason) out.push(`reason ${server.reason ?? 'none'} (server) against ${local.reason ?? 'none'}`);
  if (local.side !== server.side) out.push(`side ${server.side ?? 'none'} (server) against ${local.side ?? 'none'}`);
  if (!sameNumber(local.driftPct, server.driftPct)) out.push('the drift differs');
  if (!sameNumber(local.band.lowOhms, server.band.lowOhms) || !sameNumber(local.band.highOhms, server.band.highOhms) || local.band.source !== server.band.source) {
    out.push('the band differs');
  }
  if (!sameNumber(local.uncertaintyOhms, server.uncertaintyOhms)) out.push('U differs');
  if (!sameNumber(local.conformityProbability, server.conformityProbability)) out.push('p_c differs');
  return out;
}
