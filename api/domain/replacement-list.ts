/**
 * The replacement list (DESIGN.md §2 "replacement list"; issue 5 "After the survey"): what to
 * order, what to confirm first, and the capacitor list by policy.
 *
 * - **Order**: parts out on conclusive evidence (the survey grid's `replacementDecision` said
 *   `order`: measured on the part's own leads, or high/open in circuit after the path's joints and
 *   contacts were marked checked). Each line gets a value in the stocked series with its deviation
 *   (replacement.ts, DESIGN.md §3.7), a suggested wattage and type (dissipation.ts, §3.6:
 *   fuse-role parts keep their rating and type, mains-side parts flameproof) and a working-voltage
 *   warning; lines of the same value, wattage and type share a quantity.
 * - **To confirm**: everything else that is out (unconfirmed in-circuit lows and shorts, highs with
 *   unchecked joints, chart readings that name a path rather than a part), each with its next
 *   step. Never part of the order.
 * - **Capacitors** by policy: the template's capacitor list filtered by the policy (default: the
 *   recap — electrolytic and paper dielectrics — and every line-connected capacitor, which gets an
 *   X/Y class part; check-values.md §5 "Safety before first power-up" [SEC; CP]), plus any
 *   capacitor a reading found out.
 *
 * Replacing a carbon-composition part with carbon film is common practice (no published source);
 * a critical position gets metal film (its tight band). A deviation of kind `factory-change` is
 * the set's true design and is ordered as such; a `non-original` part is replaced with the
 * template's original value.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { dissipation } from './dissipation';
import { formatCode, formatOhms } from './notation';
import type { SeriesName } from './preferred-values';
import { replacementValue } from './replacement';
import type { SetDeviation } from './set-format';
import type { Component, Dielectric, TemplateDocument } from './template-format';
import { DEFAULT_TOLERANCE_PCT } from './verdict';
import type { ComponentKind, Method, Verdict } from './words';

/** One test point that is out, with the grid's decision (api/domain/survey-grid.ts replacementDecision). */
export interface OutFinding {
  testPointKey: string;
  /** The component the test point checks; null for a chart reading (a path between two nodes). */
  componentKey: string | null;
  from: string | null;
  to: string | null;
  readingId: number;
  /** The reading as typed (`5M`, `OL`), for the screen. */
  text?: string;
  verdict: Verdict;
  method: Method;
  decision: { list: 'order' | 'confirm'; nextStep: NextStep | null };
}

export type NextStep = 'lift-a-lead' | 'check-joint';

export const RECAP_POLICIES = ['standard', 'electrolytics', 'none'] as const;
export type RecapPolicy = (typeof RECAP_POLICIES)[number];

/** Dielectrics replaced by each recap policy (line-connected capacitors are always listed except under `none`). */
export const RECAP_DIELECTRICS: Readonly<Record<RecapPolicy, readonly Dielectric[]>> = {
  // check-values.md §5: replace electrolytic and wax-paper capacitors [SEC: hobby FAQ; CP]; paper and
  // oil-paper age the same way (common practice).
  standard: ['electrolytic', 'paper', 'wax-paper', 'oil-paper'],
  electrolytics: ['electrolytic'],
  none: [],
};

export interface ReplacementListInput {
  document: TemplateDocument;
  deviations?: readonly SetDeviation[];
  findings: readonly OutFinding[];
  /** The series the user stocks (default E24). */
  series?: SeriesName;
  /** Mains now over the set's rated mains (a voltage ratio, default 1; DESIGN.md §3.6). */
  mainsFactor?: number;
  recap?: RecapPolicy;
  /** Ordered / received marks by component key. */
  marks?: Readonly<Record<string, { orderedAt: string | null; receivedAt: string | null }>>;
  /** Findings of the capacitor checks (capacitor-checks.ts), by component key: shown as warnings on the capacitor lines. */
  capacitorWarnings?: Readonly<Record<string, string[]>>;
}

export type ResistorType = 'carbon-film' | 'metal-film' | 'wirewound' | 'flameproof' | 'as-original';

export interface Marks {
  ordered: boolean;
  orderedAt: string | null;
  received: boolean;
  receivedAt: string | null;
}

export interface OrderLine extends Marks {
  componentKey: string;
  ref: string;
  kind: ComponentKind;
  nominalText: string;
  nominalOhms: number | null;
  /** `template`, or the set's deviation when it is a factory change. */
  valueFrom: 'template' | 'factory-change';
  suggested: { ohms: number; text: string; code: string; series: SeriesName; deviationPct: number; inBand: boolean } | null;
  /** Why there is no series value (a pot, a winding…), or null. */
  noSuggestion: string | null;
  /** Suggested rating, watts; null where the template gives neither a rating nor a voltage. */
  watts: number | null;
  /** Dissipation at the mains factor, watts (null without a recorded voltage). */
  dissipationWatts: number | null;
  type: ResistorType;
  voltageWarning: string | null;
  warnings: string[];
  evidence: { testPointKey: string; readingId: number; verdict: Verdict; method: Method };
  /** Lines of the same value, wattage and type share this key and its quantity. */
  purchaseKey: string;
  quantity: number;
}

export interface ConfirmLine {
  testPointKey: string;
  componentKey: string | null;
  /** The component's reference, or the probe nodes of a chart reading (`V1.7 to B+1`). */
  ref: string;
  nominalText: string | null;
  readingText: string;
  from: string | null;
  to: string | null;
  verdict: Verdict;
  readingId: number;
  nextStep: NextStep;
  /** Words for the screen: what to do before anything is ordered. */
  advice: string;
}

export type CapacitorType = 'electrolytic' | 'film' | 'X-class' | 'Y-class' | 'X-or-Y-class' | 'as-original';

export interface CapacitorLine extends Marks {
  componentKey: string;
  ref: string;
  /** `0.01 µF 400 V` */
  text: string;
  uF: number;
  workingVolts: number;
  dielectric: Dielectric;
  polarised: boolean;
  safetyClass: 'X' | 'Y' | null;
  /** The can and section of a multi-section can ("can C20, section B"), or null. */
  can: string | null;
  type: CapacitorType;
  /** `policy` (the recap) or `reading` (a reading found it out). */
  reason: 'policy' | 'reading';
  warnings: string[];
  purchaseKey: string;
  quantity: number;
}

export interface PurchaseLine {
  purchaseKey: string;
  list: 'order' | 'capacitors';
  description: string;
  refs: string[];
  quantity: number;
}

export interface ReplacementList {
  order: OrderLine[];
  confirm: ConfirmLine[];
  capacitors: CapacitorLine[];
  /** The order and capacitor lines aggregated: one line per value, wattage and type. */
  purchase: PurchaseLine[];
  series: SeriesName;
  recap: RecapPolicy;
}

const wattsText = (w: number): string => ({ 0.125: '⅛ W', 0.25: '¼ W', 0.5: '½ W' })[w] ?? `${+w.toPrecision(4)} W`;

const ADVICE: Record<NextStep, string> = {
  'lift-a-lead': 'Lift a lead and measure the part on its own leads before ordering: an in-circuit reading can be a parallel path.',
  'check-joint': 'Check the joints and contacts of the path, then the part: a high reading can be a bad joint.',
};

function marksOf(m?: { orderedAt: string | null; receivedAt: string | null }): Marks {
  return { ordered: !!m?.orderedAt, orderedAt: m?.orderedAt ?? null, received: !!m?.receivedAt, receivedAt: m?.receivedAt ?? null };
}

/** The resistor type to order (fuse role and mains side first, DESIGN.md §3.6). */
export function resistorType(c: Pick<Component, 'kind' | 'fuseRole' | 'mainsSide' | 'critical'>): ResistorType {
  if (c.fuseRole) return 'as-original';
  if (c.mainsSide) return 'flameproof';
  if (c.kind === 'wirewound') return 'wirewound';
  if (c.critical || c.kind === 'metal-film') return 'metal-film';
  if (c.kind === 'carbon-composition' || c.kind === 'carbon-film') return 'carbon-film';
  return 'as-original';
}

/** The capacitor type to order: X/Y class for line-connected ones, film for paper dielectrics. */
export function capacitorType(c: Component): CapacitorType {
  const cap = c.capacitor!;
  if (cap.lineConnected || cap.safetyClass) return cap.safetyClass === 'X' ? 'X-class' : cap.safetyClass === 'Y' ? 'Y-class' : 'X-or-Y-class';
  if (cap.dielectric === 'electrolytic') return 'electrolytic';
  if (cap.dielectric === 'paper' || cap.dielectric === 'wax-paper' || cap.dielectric === 'oil-paper') return 'film';
  return 'as-original';
}

function nominalOf(c: Component, deviation: SetDeviation | undefined): { ohms: number | null; text: string; from: OrderLine['valueFrom']; tolerancePct: number | null } {
  const useDeviation = deviation?.kind === 'factory-change';
  const n = useDeviation ? deviation!.nominal : c.nominal;
  const tol = useDeviation && deviation!.tolerancePct !== null ? deviation!.tolerancePct : c.tolerancePct;
  if ('ohms' in n) return { ohms: n.ohms, text: formatOhms(n.ohms), from: useDeviation ? 'factory-change' : 'template', tolerancePct: tol };
  return { ohms: null, text: n.state, from: useDeviation ? 'factory-change' : 'template', tolerancePct: tol };
}

function orderLine(c: Component, f: OutFinding, input: ReplacementListInput): OrderLine {
  const series = input.series ?? 'E24';
  const deviation = input.deviations?.find((d) => d.componentKey === c.key);
  const nominal = nominalOf(c, deviation);
  const warnings: string[] = [];
  if (deviation?.kind === 'non-original') warnings.push(`a non-original part was found here (${deviation.note || 'see the set\u2019s deviations'}): the line restores the template\u2019s value`);
  const kind = c.kind as ComponentKind;
  let suggested: OrderLine['suggested'] = null;
  let noSuggestion: string | null = null;
  if (nominal.ohms !== null && nominal.ohms > 0) {
    // The band the new part must sit in: a critical position's own, else the marked tolerance (DESIGN.md §3.7).
    const band = c.critical
      ? { lowOhms: nominal.ohms * (1 + c.critical.lowPct / 100), highOhms: nominal.ohms * (1 + c.critical.highPct / 100) }
      : { lowOhms: nominal.ohms * (1 - (nominal.tolerancePct ?? DEFAULT_TOLERANCE_PCT) / 100), highOhms: nominal.ohms * (1 + (nominal.tolerancePct ?? DEFAULT_TOLERANCE_PCT) / 100) };
    const r = replacementValue({ nominalOhms: nominal.ohms, band, series, kind });
    if (r) {
      suggested = { ohms: r.ohms, text: formatOhms(r.ohms), code: formatCode(r.ohms), series: r.series, deviationPct: r.deviationPct, inBand: r.inBand };
      if (!r.inBand) warnings.push(`no ${series} value sits inside the band: choose a closer series or a selected part`);
    } else noSuggestion = `a ${kind} is not chosen from a value series: match the original`;
  } else noSuggestion = `the template gives no resistance for ${c.ref}: match the original`;

  let watts: number | null = c.ratedWatts;
  let dissipationWatts: number | null = null;
  let voltageWarning: string | null = null;
  const role = c.fuseRole ? 'fuse' : c.mainsSide ? 'mains-side' : null;
  const ohms = suggested?.ohms ?? nominal.ohms;
  if (c.voltsAcross !== null && ohms !== null && ohms > 0) {
    const d = dissipation({
      ohms,
      volts: c.voltsAcross,
      ...(c.ratedWatts !== null ? { ratedWatts: c.ratedWatts } : {}),
      ...(c.ratedVolts !== null ? { ratedVolts: c.ratedVolts } : {}),
      mainsFactor: input.mainsFactor ?? 1,
      role,
      kind,
    });
    watts = d.suggestedWatts;
    dissipationWatts = d.watts;
    voltageWarning = d.voltageWarning;
    for (const n of d.notes) if (n.code === 'fuse-role' || n.code === 'mains-side-flameproof' || n.code === 'original-overloaded') warnings.push(n.text);
  } else {
    if (c.ratedWatts === null) warnings.push('no rating or voltage in the template: size the part from the original');
    else warnings.push(`no voltage across the part in the template: the original ${wattsText(c.ratedWatts)} rating is kept`);
    if (role === 'fuse') warnings.push('fuse-role part: replace with the same rating and the same type (fusible or flameproof); a larger part would not open as designed');
    if (role === 'mains-side') warnings.push('mains-side part: use a flameproof type');
  }
  const type = resistorType(c);
  const valueKey = suggested ? String(suggested.ohms) : `${c.kind}:${nominal.text}`;
  return {
    componentKey: c.key,
    ref: c.ref,
    kind,
    nominalText: nominal.text,
    nominalOhms: nominal.ohms,
    valueFrom: nominal.from,
    suggested,
    noSuggestion,
    watts,
    dissipationWatts,
    type,
    voltageWarning,
    warnings,
    evidence: { testPointKey: f.testPointKey, readingId: f.readingId, verdict: f.verdict, method: f.method },
    purchaseKey: `R|${valueKey}|${watts ?? '?'}|${type}`,
    quantity: 1,
    ...marksOf(input.marks?.[c.key]),
  };
}

function capacitorLine(c: Component, reason: CapacitorLine['reason'], input: ReplacementListInput): CapacitorLine {
  const cap = c.capacitor!;
  const type = capacitorType(c);
  const warnings = [...(input.capacitorWarnings?.[c.key] ?? [])];
  if (cap.can) warnings.push(`section ${cap.can.section} of can ${cap.can.id}: replace or restuff the whole can, keeping its common return`);
  if (type === 'X-or-Y-class') warnings.push('line-connected: X class across the line, Y class from the line to the chassis');
  return {
    componentKey: c.key,
    ref: c.ref,
    text: `${+cap.uF.toPrecision(4)} µF ${cap.workingVolts} V`,
    uF: cap.uF,
    workingVolts: cap.workingVolts,
    dielectric: cap.dielectric,
    polarised: cap.polarised,
    safetyClass: cap.safetyClass,
    can: cap.can ? `can ${cap.can.id}, section ${cap.can.section}` : null,
    type,
    reason,
    warnings,
    purchaseKey: `C|${cap.uF}|${cap.workingVolts}|${type}|${cap.polarised ? 'polarised' : 'non-polarised'}`,
    quantity: 1,
    ...marksOf(input.marks?.[c.key]),
  };
}

/** Builds the three lists (and the aggregated purchase lines) from a survey's out findings. */
export function replacementList(input: ReplacementListInput): ReplacementList {
  const series = input.series ?? 'E24';
  const recap = input.recap ?? 'standard';
  const byKey = new Map(input.document.components.map((c) => [c.key, c]));
  const order = new Map<string, OrderLine>();
  const confirm: ConfirmLine[] = [];
  const capacitorsByReading = new Set<string>();

  // Conclusive first, so that a part both ordered and suspected elsewhere is only ordered.
  const findings = [...input.findings].sort((a, b) => (a.decision.list === b.decision.list ? 0 : a.decision.list === 'order' ? -1 : 1));
  for (const f of findings) {
    const c = f.componentKey !== null ? byKey.get(f.componentKey) : undefined;
    if (c && c.kind === 'capacitor') {
      if (f.decision.list === 'order') capacitorsByReading.add(c.key);
      else confirm.push(confirmLine(f, c, f.decision.nextStep ?? 'lift-a-lead'));
      continue;
    }
    if (c && c.kind !== 'wire' && f.decision.list === 'order') {
      if (!order.has(c.key)) order.set(c.key, orderLine(c, f, input));
      continue;
    }
    if (c && order.has(c.key)) continue;
    // A chart reading names a path, not a part: measure the candidates on their own leads first.
    const step: NextStep = f.decision.nextStep ?? (c ? 'check-joint' : 'lift-a-lead');
    confirm.push(confirmLine(f, c ?? null, step));
  }

  const dielectrics = RECAP_DIELECTRICS[recap];
  const capacitors: CapacitorLine[] = [];
  for (const c of input.document.components) {
    if (c.kind !== 'capacitor' || !c.capacitor) continue;
    const byPolicy = recap !== 'none' && (dielectrics.includes(c.capacitor.dielectric) || c.capacitor.lineConnected || c.capacitor.safetyClass !== null);
    if (capacitorsByReading.has(c.key)) capacitors.push(capacitorLine(c, 'reading', input));
    else if (byPolicy) capacitors.push(capacitorLine(c, 'policy', input));
  }

  const orderLines = [...order.values()];
  const purchase = aggregate(orderLines, capacitors);
  const qty = new Map(purchase.map((p) => [p.purchaseKey, p.quantity]));
  for (const l of orderLines) l.quantity = qty.get(l.purchaseKey)!;
  for (const l of capacitors) l.quantity = qty.get(l.purchaseKey)!;
  return { order: orderLines, confirm, capacitors, purchase, series, recap };
}

function confirmLine(f: OutFinding, c: Component | null, nextStep: NextStep): ConfirmLine {
  return {
    testPointKey: f.testPointKey,
    componentKey: c?.key ?? null,
    ref: c?.ref ?? (f.from && f.to ? `${f.from} to ${f.to}` : f.testPointKey),
    nominalText: c ? ('ohms' in c.nominal ? formatOhms(c.nominal.ohms) : c.nominal.state) : null,
    readingText: f.text ?? '',
    from: f.from,
    to: f.to,
    verdict: f.verdict,
    readingId: f.readingId,
    nextStep,
    advice: ADVICE[nextStep],
  };
}

function aggregate(order: readonly OrderLine[], capacitors: readonly CapacitorLine[]): PurchaseLine[] {
  const out = new Map<string, PurchaseLine>();
  const add = (key: string, list: PurchaseLine['list'], description: string, ref: string) => {
    const p = out.get(key) ?? { purchaseKey: key, list, description, refs: [], quantity: 0 };
    p.refs.push(ref);
    p.quantity++;
    out.set(key, p);
  };
  for (const l of order) {
    const value = l.suggested ? l.suggested.text : `${l.nominalText} ${l.kind}`;
    add(l.purchaseKey, 'order', `${value}${l.watts !== null ? `, ${wattsText(l.watts)}` : ''}, ${l.type}`, l.ref);
  }
  for (const l of capacitors) {
    add(l.purchaseKey, 'capacitors', `${+l.uF.toPrecision(4)} µF ${l.workingVolts} V, ${l.type}${l.polarised ? ', polarised' : ''}`, l.ref);
  }
  return [...out.values()];
}

/** RFC 4180 CSV of the purchase lines with the per-component marks (header row first). */
export function replacementCsv(list: ReplacementList): string {
  const header = ['list', 'refs', 'description', 'quantity', 'value', 'series deviation %', 'watts', 'type', 'voltage warning', 'ordered', 'received'];
  const rows: string[][] = [header];
  const lines = [...list.order.map((l) => ({ l, kind: 'order' as const })), ...list.capacitors.map((l) => ({ l, kind: 'capacitors' as const }))];
  for (const p of list.purchase) {
    const members = lines.filter((x) => x.l.purchaseKey === p.purchaseKey);
    const first = members[0];
    const ordered = members.every((m) => m.l.ordered);
    const received = members.every((m) => m.l.received);
    if (first.kind === 'order') {
      const o = first.l as OrderLine;
      rows.push([
        'order',
        p.refs.join(' '),
        p.description,
        String(p.quantity),
        o.suggested ? o.suggested.text : o.nominalText,
        o.suggested ? o.suggested.deviationPct.toFixed(1) : '',
        o.watts !== null ? String(o.watts) : '',
        o.type,
        members.map((m) => (m.l as OrderLine).voltageWarning).filter(Boolean).join('; '),
        ordered ? 'yes' : 'no',
        received ? 'yes' : 'no',
      ]);
    } else {
      const c = first.l as CapacitorLine;
      rows.push(['capacitors', p.refs.join(' '), p.description, String(p.quantity), `${+c.uF.toPrecision(4)} µF ${c.workingVolts} V`, '', '', c.type, '', ordered ? 'yes' : 'no', received ? 'yes' : 'no']);
    }
  }
  return rows.map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

/** One CSV field (RFC 4180): quoted when it holds a comma, quote or line break; a leading =+-@ is prefixed with ' (spreadsheet formula injection). */
export function csvField(v: string | number | boolean | null | undefined): string {
  let s = v === null || v === undefined ? '' : String(v);
  if (/^[=+\-@\t\r]/.test(s) && !/^-?\d/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
