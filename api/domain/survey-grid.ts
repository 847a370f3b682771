/**
 * The bench grid (issue #5, DESIGN.md §2 "survey", "reading", "verdict", §3.4–3.5): the rows of a
 * survey in bench order with their expected values, bands and in-circuit expectations, and the
 * verdict of each reading in its survey's context. One module for the API (survey view, reading
 * save) and the browser (the instant verdict), so both always compute the same answer.
 *
 * - A set's deviations replace the template's nominal (and tolerance) of a component before
 *   anything else: the survey expects the deviation, not the template value.
 * - Component checks read on the part's own leads (lead lifted, out of circuit) are judged on the
 *   part's band directly. In circuit, where the chassis network holds the part as one edge, the
 *   implied value of the part and its honest interval are judged against the band
 *   (api/domain/in-circuit.ts analysePart); a reading the network does not explain is
 *   `inconclusive` (`unexplained-in-circuit`). Elsewhere (no network, pots, links) the plain
 *   verdict passes through `noNetworkAdvice`: a low in-circuit reading is inconclusive, a high one
 *   says "path high: check the joints and contacts, then the part".
 * - Chart readings are judged against the printed in-circuit value and the chart's tolerance.
 * - Pair relations are judged on the ratio of their two positions' current readings.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { assembleNetwork } from './chassis-network';
import { analysePart, toleranceNetworks, noNetworkAdvice, type ToleranceNetworks } from './in-circuit';
import { expandedUncertainty, inferRange, type MeterProfile } from './meter';
import { ChassisNetwork } from './network';
import { formatOhms, parseResistance } from './notation';
import type { GridAdvice, ReadingEvaluation, SetDeviation, SurveyConditions, VerdictCounts } from './set-format';
import type { Component, TemplateDocument, TestPoint, TestPointKind, TubeTypeRecord } from './template-format';
import { chooseBand, DEFAULT_THRESHOLDS, judge, type AcceptanceRule, type VerdictInput, type VerdictResult } from './verdict';
import { NON_NETWORK_KINDS, VERDICT_SEVERITY, type BandSource, type ComponentKind, type Method, type ReadingState, type Verdict } from './words';

export interface GridInput {
  document: TemplateDocument;
  tubeTypes: readonly TubeTypeRecord[];
  deviations: readonly SetDeviation[];
  meter: MeterProfile | null;
  rule: AcceptanceRule;
  conditions: SurveyConditions;
}

export interface GridRow {
  testPointKey: string;
  stageKey: string;
  stageName: string;
  /** Bench order (the template's test point order). */
  index: number;
  kind: TestPointKind;
  /** The probe nodes; null for a pair relation. */
  from: string | null;
  to: string | null;
  /** The pin probe, when one probe is a pin. */
  socket: { designator: string; pin: number; electrode: string; label: string } | null;
  component: { key: string; ref: string; kind: string; nominalText: string; critical: boolean; fuseRole: boolean; mainsSide: boolean } | null;
  expected: { ohms: number } | { state: 'open' | 'short' } | null;
  expectedText: string;
  expectedSource: 'nominal' | 'chart' | 'deviation';
  /** The band in signed percent (null for expected states and pair relations). */
  band: { lowPct: number; highPct: number; source: BandSource } | null;
  /** Where the network holds this test point: what a healthy chassis reads between the probes. */
  inCircuit: { expectedOhms: number | null; healthyLowOhms: number | null; healthyHighOhms: number | null } | null;
  excluded: 'non-network-kind' | 'pair-relation' | null;
  /** Pair relations: the two positions and the ratio tolerance. */
  pair: { a: string; b: string; ratioTolerancePct: number } | null;
}

export interface GridReading {
  id: number;
  testPointKey: string;
  followsReadingId: number | null;
  text: string;
  state: ReadingState;
  ohms: number | null;
  method: Method;
  liftedEnd: 0 | 1 | null;
  rangeIndex: number | null;
}

/** Text the measurement core cannot parse, or a reading that does not fit its row. */
export class GridInputError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

function resolutionOf(meter: MeterProfile | null | undefined, rangeIndex?: number | null): number | undefined {
  if (!meter || meter.kind !== 'digital' || meter.ranges.length === 0) return undefined;
  const i = rangeIndex ?? 0;
  return meter.ranges[Math.max(0, Math.min(meter.ranges.length - 1, i))]?.resolutionOhms;
}

/** Parses what was typed with the measurement core; throws GridInputError('text', the core's message). */
export function parseReadingText(text: string, meter?: MeterProfile | null, rangeIndex?: number | null): { state: ReadingState; ohms: number | null; display: string } {
  const parsed = parseResistance(text, { leadOhms: meter?.leadOhms, resolutionOhms: resolutionOf(meter, rangeIndex) });
  if (!parsed.ok) throw new GridInputError('text', parsed.message);
  return { state: parsed.state, ohms: parsed.ohms, display: parsed.display };
}

const EMPTY_COUNTS = (): VerdictCounts => ({ inBand: 0, nearLimit: 0, out: 0, inconclusive: 0, unread: 0 });

/** Adds one summed-up outcome to counts. */
export function countVerdict(counts: VerdictCounts, verdict: Verdict | null): void {
  switch (verdict) {
    case 'in-band':
      counts.inBand++;
      return;
    case 'near-limit':
      counts.nearLimit++;
      return;
    case 'high':
    case 'low':
    case 'open':
    case 'short':
      counts.out++;
      return;
    case 'inconclusive':
      counts.inconclusive++;
      return;
    default:
      counts.unread++;
  }
}

/** The worst of several verdicts (DESIGN.md §2: open/short > high/low > inconclusive > near-limit > in-band > not-read). */
export function worstVerdict(verdicts: Iterable<Verdict>): Verdict {
  let worst: Verdict = 'not-read';
  for (const v of verdicts) if (VERDICT_SEVERITY[v] > VERDICT_SEVERITY[worst]) worst = v;
  return worst;
}

const isPin = (node: string): boolean => /^[A-Za-z][A-Za-z0-9]*\.\d+$/.test(node);

function applyDeviations(doc: TemplateDocument, deviations: readonly SetDeviation[]): { doc: TemplateDocument; deviated: Set<string> } {
  if (deviations.length === 0) return { doc, deviated: new Set() };
  const byComponent = new Map(deviations.map((d) => [d.componentKey, d]));
  const components = doc.components.map((c): Component => {
    const d = byComponent.get(c.key);
    if (d === undefined) return c;
    return { ...c, nominal: d.nominal, tolerancePct: d.tolerancePct ?? c.tolerancePct };
  });
  return { doc: { ...doc, components }, deviated: new Set(byComponent.keys()) };
}

function nominalText(n: Component['nominal']): string {
  if ('state' in n) return n.state;
  return formatOhms(n.ohms);
}

/** Evaluations kept per grid (a survey's readings with their follow-ups fit many times over). */
const MEMO_MAX = 20_000;

interface ConditionNetworks {
  nets: ToleranceNetworks | null;
}

/** The rows of a survey and the verdicts of its readings. */
export class SurveyGrid {
  readonly rows: readonly GridRow[];
  private readonly byKey = new Map<string, GridRow>();
  private readonly components = new Map<string, Component>();
  private readonly testPoints = new Map<string, TestPoint>();
  private readonly networks = new Map<boolean, ConditionNetworks>();
  private readonly doc: TemplateDocument;
  private readonly meter: MeterProfile | null;
  private readonly rule: AcceptanceRule;
  private readonly tubes: Map<string, TubeTypeRecord>;
  private readonly surveyTubesIn: boolean;
  private readonly memo = new Map<string, ReadingEvaluation>();

  constructor(input: GridInput) {
    const { doc, deviated } = applyDeviations(input.document, input.deviations);
    this.doc = doc;
    this.meter = input.meter;
    this.rule = input.rule;
    this.tubes = new Map(input.tubeTypes.map((t) => [t.designation.toUpperCase(), t]));
    this.surveyTubesIn = input.conditions.tubesIn;
    for (const c of doc.components) this.components.set(c.key, c);
    const stageNames = new Map(doc.stages.map((s) => [s.key, s.name]));
    const sockets = new Map<string, string>();
    for (const st of doc.stages) for (const so of st.sockets) sockets.set(so.designator, so.tubeType);
    const rows: GridRow[] = [];
    doc.testPoints.forEach((tp, index) => {
      this.testPoints.set(tp.key, tp);
      const row = this.buildRow(tp, index, stageNames.get(tp.stageKey) ?? '', sockets, deviated);
      rows.push(row);
      this.byKey.set(row.testPointKey, row);
    });
    this.rows = rows;
  }

  row(testPointKey: string): GridRow | undefined {
    return this.byKey.get(testPointKey);
  }

  private tubesInFor(tp: TestPoint): boolean {
    if (tp.kind === 'chart-reading') return tp.conditions.tubesIn ?? this.doc.conditions.tubesIn;
    return this.surveyTubesIn;
  }

  private networksFor(tubesIn: boolean): ConditionNetworks {
    let n = this.networks.get(tubesIn);
    if (n === undefined) {
      let nets: ToleranceNetworks | null = null;
      try {
        const assembled = assembleNetwork(this.doc, this.tubes, { tubesIn });
        if (assembled.edges.length > 0 && !assembled.problems.some((p) => p.severity === 'error')) nets = toleranceNetworks(assembled.edges);
      } catch {
        nets = null;
      }
      n = { nets };
      this.networks.set(tubesIn, n);
    }
    return n;
  }

  private resistance(net: ChassisNetwork, from: string, to: string): number | null {
    if (from === to) return 0;
    if (!net.hasNode(from) || !net.hasNode(to)) return null;
    return net.resistance(from, to);
  }

  private buildRow(tp: TestPoint, index: number, stageName: string, sockets: Map<string, string>, deviated: Set<string>): GridRow {
    const base = { testPointKey: tp.key, stageKey: tp.stageKey, stageName, index, kind: tp.kind };
    if (tp.kind === 'pair-relation') {
      return {
        ...base,
        from: null,
        to: null,
        socket: null,
        component: null,
        expected: null,
        expectedText: `ratio 1 ± ${tp.ratioTolerancePct} %`,
        expectedSource: 'nominal',
        band: { lowPct: -tp.ratioTolerancePct, highPct: tp.ratioTolerancePct, source: 'template' },
        inCircuit: null,
        excluded: 'pair-relation',
        pair: { a: tp.a, b: tp.b, ratioTolerancePct: tp.ratioTolerancePct },
      };
    }
    let from: string;
    let to: string;
    let component: GridRow['component'] = null;
    let expected: GridRow['expected'];
    let expectedSource: GridRow['expectedSource'];
    let bandInput: Pick<VerdictInput, 'expected' | 'tolerancePct' | 'critical' | 'kind'>;
    let excluded: GridRow['excluded'] = null;
    let c: Component | undefined;
    if (tp.kind === 'component-check') {
      c = this.components.get(tp.componentKey);
      if (c === undefined) throw new GridInputError('document', `test point ${tp.key} checks an unknown component ${tp.componentKey}`);
      [from, to] = c.nodes;
      component = { key: c.key, ref: c.ref, kind: c.kind, nominalText: nominalText(c.nominal), critical: c.critical !== null, fuseRole: c.fuseRole, mainsSide: c.mainsSide };
      expected = 'state' in c.nominal ? { state: c.nominal.state } : { ohms: c.nominal.ohms };
      expectedSource = deviated.has(c.key) ? 'deviation' : 'nominal';
      bandInput = {
        expected: 'state' in c.nominal ? c.nominal.state : c.nominal.ohms,
        tolerancePct: c.tolerancePct ?? undefined,
        critical: c.critical ?? undefined,
        kind: c.kind === 'wire' ? undefined : c.kind,
      };
      if (c.kind !== 'wire' && NON_NETWORK_KINDS.includes(c.kind)) excluded = 'non-network-kind';
    } else {
      from = tp.from;
      to = tp.to;
      expected = tp.expected;
      expectedSource = 'chart';
      bandInput = { expected: 'state' in tp.expected ? tp.expected.state : tp.expected.ohms, tolerancePct: tp.tolerancePct };
    }
    let band: GridRow['band'] = null;
    if (expected !== null && 'ohms' in expected) {
      const b = chooseBand(bandInput, this.rule, DEFAULT_THRESHOLDS);
      if (b.lowPct !== null && b.highPct !== null) band = { lowPct: b.lowPct, highPct: b.highPct, source: b.source };
    }
    const pinNode = isPin(from) ? from : isPin(to) ? to : null;
    let socket: GridRow['socket'] = null;
    if (pinNode !== null) {
      const [designator, pinText] = pinNode.split('.');
      const pin = Number(pinText);
      const tt = this.tubes.get((sockets.get(designator) ?? '').toUpperCase());
      const p = tt?.pins.find((x) => x.pin === pin);
      socket = { designator, pin, electrode: p?.electrode ?? '', label: p?.label ?? '' };
    }
    let inCircuit: GridRow['inCircuit'] = null;
    if (excluded === null) {
      const { nets } = this.networksFor(this.tubesInFor(tp));
      if (nets !== null) {
        const nominal = this.resistance(nets.nominal, from, to);
        const low = this.resistance(nets.low, from, to);
        const high = this.resistance(nets.high, from, to);
        inCircuit = { expectedOhms: nominal, healthyLowOhms: low, healthyHighOhms: high };
      }
    }
    return { ...base, from, to, socket, component, expected, expectedText: expected === null ? '' : 'state' in expected ? expected.state : formatOhms(expected.ohms), expectedSource, band, inCircuit, excluded, pair: null };
  }

  /** The current reading per test point: the newest one that no follow-up supersedes. */
  current(readings: readonly GridReading[]): Map<string, GridReading> {
    const superseded = new Set<number>();
    for (const r of readings) if (r.followsReadingId !== null) superseded.add(r.followsReadingId);
    const out = new Map<string, GridReading>();
    for (const r of readings) {
      if (superseded.has(r.id)) continue;
      const had = out.get(r.testPointKey);
      if (had === undefined || r.id > had.id) out.set(r.testPointKey, r);
    }
    return out;
  }

  /**
   * The verdict of one reading in the survey's context. Memoised per reading content (a grid is
   * immutable and the verdict depends only on the reading and the grid), so a survey reopened or a
   * reading confirmed again costs a lookup; the caller must not mutate the answer.
   */
  evaluate(reading: GridReading, opts: { jointChecked?: boolean } = {}): ReadingEvaluation {
    const memoKey = `${reading.id}|${reading.testPointKey}|${reading.state}|${reading.ohms}|${reading.method}|${reading.rangeIndex}|${reading.liftedEnd}|${opts.jointChecked === true}`;
    const hit = this.memo.get(memoKey);
    if (hit !== undefined) return hit;
    const answer = this.evaluateFresh(reading, opts);
    if (this.memo.size >= MEMO_MAX) this.memo.clear();
    this.memo.set(memoKey, answer);
    return answer;
  }

  private evaluateFresh(reading: GridReading, opts: { jointChecked?: boolean }): ReadingEvaluation {
    const row = this.byKey.get(reading.testPointKey);
    const tp = this.testPoints.get(reading.testPointKey);
    if (row === undefined || tp === undefined) throw new GridInputError('testPointKey', `no test point ${reading.testPointKey} in this template version`);
    if (tp.kind === 'pair-relation') {
      // A pair relation has no reading of its own: see evaluatePair.
      return this.wrap(reading, null, null, []);
    }
    const method = reading.method;
    const rangeIndex = reading.rangeIndex ?? undefined;
    const c = tp.kind === 'component-check' ? this.components.get(tp.componentKey) : undefined;
    const kind: ComponentKind | undefined = c && c.kind !== 'wire' ? c.kind : undefined;
    const expectedValue: VerdictInput['expected'] =
      tp.kind === 'component-check' ? ('state' in c!.nominal ? c!.nominal.state : c!.nominal.ohms) : 'state' in tp.expected ? tp.expected.state : tp.expected.ohms;
    const input: VerdictInput = {
      expected: expectedValue,
      reading: { state: reading.state, ohms: reading.ohms },
      tolerancePct: tp.kind === 'component-check' ? (c!.tolerancePct ?? undefined) : tp.tolerancePct,
      critical: c?.critical ?? undefined,
      kind,
      method,
      rangeIndex,
      rule: this.rule,
      meter: this.meter ?? undefined,
    };
    let result: VerdictResult;
    try {
      result = judge(input);
    } catch (e) {
      return { ...this.wrap(reading, null, null, []), error: e instanceof Error ? e.message : String(e) };
    }
    const advice: GridAdvice[] = [];
    if (result.reason === 'over-range') advice.push('take-higher-range');
    if (result.verdict === 'inconclusive' && (result.reason === 'climbing' || result.reason === 'unstable')) advice.push('recheck');

    // On the part's own leads, or a chart reading: the plain verdict stands.
    if (method !== 'in-circuit' || tp.kind === 'chart-reading' || c === undefined) {
      if (tp.kind === 'chart-reading' && method === 'in-circuit') {
        if (result.verdict === 'low' || result.verdict === 'short') advice.push('lift-a-lead');
        if (result.verdict === 'high' || result.verdict === 'open') advice.push('path-high');
      }
      return this.wrap(reading, result, null, advice, result.verdict, result.reason);
    }

    // A component check in circuit.
    const nets = row.excluded === null ? this.networksFor(this.tubesInFor(tp)).nets : null;
    const single = nets !== null && c.kind !== 'pot' && c.kind !== 'wire' && 'ohms' in c.nominal && c.nominal.ohms > 0;
    const corrected = result.explanation.correctedOhms;
    const U = reading.state === 'value' && corrected !== null ? this.uncertaintyAt(reading.ohms ?? corrected, rangeIndex) : null;
    if (single && reading.state === 'value' && corrected !== null && U !== null && Number.isFinite(U) && result.band.highOhms !== null) {
      const band = { lowOhms: result.band.lowOhms, highOhms: result.band.highOhms };
      const a = analysePart(nets!, c.key, c.nodes[0], c.nodes[1], corrected, U, band, true);
      const implied = { ohms: a.impliedOhms, lowOhms: a.impliedInterval?.lowOhms ?? null, highOhms: a.impliedInterval?.highOhms ?? null, explainable: a.explainable };
      if (a.relation !== 'independent' && a.verdict !== null) {
        if (a.verdict === 'inconclusive') {
          if (a.explainable === false) {
            const tooHigh = a.explainableRange?.highOhms !== null && a.explainableRange !== null && corrected - U > a.explainableRange.highOhms!;
            advice.push(tooHigh ? 'path-high' : 'lift-a-lead');
          } else advice.push('lift-a-lead');
          return this.wrap(reading, result, implied, advice, 'inconclusive', 'unexplained-in-circuit', null);
        }
        // The interval decides in-band / high / low; near-limit and drift from the implied value.
        let verdict: Verdict = a.verdict;
        let driftPct: number | null = null;
        if (a.impliedOhms !== null && typeof expectedValue === 'number') {
          driftPct = ((a.impliedOhms - expectedValue) / expectedValue) * 100;
          if (verdict === 'in-band') {
            const nl = result.explanation.nearLimit;
            if (nl !== null && (a.impliedOhms < nl.lowOhms || a.impliedOhms > nl.highOhms)) verdict = 'near-limit';
          }
        }
        if (verdict === 'high') advice.push('path-high');
        if (verdict === 'low') advice.push('lift-a-lead');
        return this.wrap(reading, result, implied, advice, verdict, null, driftPct);
      }
    }
    // No usable network for this part: what the plain verdict may claim in circuit.
    const nn = noNetworkAdvice(result.verdict, { method, kind, jointsChecked: opts.jointChecked === true, reason: result.reason });
    if (nn.reason === 'unexplained-in-circuit') advice.push('lift-a-lead');
    for (const cv of nn.caveats) {
      if (cv.code === 'lift-a-lead' || cv.code === 'short-lift-a-lead') advice.push('lift-a-lead');
      else if (cv.code === 'path-high-check-joints' || cv.code === 'path-open-check-joints') advice.push('path-high');
      else if (cv.code === 'short-suspect-parallel-capacitor') advice.push('check-parallel-capacitor');
      else if (cv.code === 'not-low-high-not-ruled-out') advice.push('not-low-high-not-ruled-out');
    }
    return this.wrap(reading, result, null, advice, nn.verdict, nn.reason);
  }

  /** A pair relation's verdict on the ratio of its two positions' current readings (values only). */
  evaluatePair(row: GridRow, a: GridReading | undefined, b: GridReading | undefined): { verdict: Verdict; ratio: number | null; driftPct: number | null } {
    if (row.pair === null || a === undefined || b === undefined || a.state !== 'value' || b.state !== 'value' || !a.ohms || !b.ohms) return { verdict: 'not-read', ratio: null, driftPct: null };
    const ratio = a.ohms / b.ohms;
    const r = judge({ expected: 1, reading: { state: 'value', ohms: ratio }, tolerancePct: row.pair.ratioTolerancePct, rule: { ...this.rule, bandFrom: 'template' } });
    return { verdict: r.verdict, ratio, driftPct: r.driftPct };
  }

  private uncertaintyAt(ohms: number, rangeIndex: number | undefined): number {
    if (this.meter === null) return 0;
    try {
      const i = rangeIndex ?? inferRange(this.meter, ohms);
      return expandedUncertainty(this.meter, ohms, i);
    } catch {
      return Number.POSITIVE_INFINITY;
    }
  }

  private wrap(
    reading: GridReading,
    result: VerdictResult | null,
    implied: ReadingEvaluation['implied'],
    advice: GridAdvice[],
    verdict: Verdict = result?.verdict ?? 'not-read',
    reason: ReadingEvaluation['reason'] = result?.reason ?? null,
    driftPct: number | null = result?.driftPct ?? null,
  ): ReadingEvaluation {
    return {
      readingId: reading.id,
      testPointKey: reading.testPointKey,
      verdict,
      reason,
      driftPct,
      uncertaintyOhms: result?.uncertaintyOhms ?? null,
      result,
      implied,
      advice: [...new Set(advice)],
    };
  }

  /** Stage summaries and the survey's total from the current evaluation of each test point. */
  summary(evaluations: ReadonlyMap<string, ReadingEvaluation>): { stages: Record<string, VerdictCounts>; total: VerdictCounts } {
    const stages: Record<string, VerdictCounts> = {};
    const total = EMPTY_COUNTS();
    for (const st of this.doc.stages) stages[st.key] = EMPTY_COUNTS();
    for (const row of this.rows) {
      if (row.excluded === 'pair-relation') continue;
      const v = evaluations.get(row.testPointKey)?.verdict ?? null;
      const s = (stages[row.stageKey] ??= EMPTY_COUNTS());
      countVerdict(s, v);
      countVerdict(total, v);
    }
    return { stages, total };
  }

  /** Evaluates every current reading: by test point key. */
  evaluateAll(readings: readonly GridReading[], jointChecks: Readonly<Record<string, unknown>> = {}): Map<string, ReadingEvaluation> {
    const out = new Map<string, ReadingEvaluation>();
    for (const [key, r] of this.current(readings)) {
      if (!this.byKey.has(key)) continue;
      out.set(key, this.evaluate(r, { jointChecked: key in jointChecks }));
    }
    return out;
  }
}

/**
 * DESIGN.md §2 "replacement list": a part goes to the order only on conclusive evidence —
 * measured on its own leads (lead lifted, out of circuit), or high/open in circuit after the
 * joints and contacts of the path are marked checked. Everything else that is out goes to the
 * "to confirm" list with its next step. Null when the reading does not say the part is out.
 */
export function replacementDecision(
  row: GridRow,
  reading: GridReading,
  evaluation: ReadingEvaluation,
  jointChecked: boolean,
): { list: 'order' | 'confirm'; nextStep: 'lift-a-lead' | 'check-joint' | null } | null {
  const v = evaluation.verdict;
  const out = v === 'high' || v === 'low' || v === 'open' || v === 'short';
  const unexplained = v === 'inconclusive' && evaluation.reason === 'unexplained-in-circuit';
  if (!out && !unexplained) return null;
  if (row.kind === 'component-check' && reading.method !== 'in-circuit' && out) return { list: 'order', nextStep: null };
  if (v === 'high' || v === 'open') return jointChecked && row.kind === 'component-check' ? { list: 'order', nextStep: null } : { list: 'confirm', nextStep: 'check-joint' };
  if (unexplained && evaluation.advice.includes('path-high')) return { list: 'confirm', nextStep: 'check-joint' };
  return { list: 'confirm', nextStep: 'lift-a-lead' };
}
