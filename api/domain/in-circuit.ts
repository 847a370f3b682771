/**
 * In-circuit reasoning (DESIGN.md §3.5): what a reading between two nodes says about one part
 * when the rest of the chassis network is known — the implied value of the part, its honest
 * interval, whether the part can explain the reading at all, the healthy range of the reading —
 * and, without a network, what an in-circuit verdict may and may not claim.
 *
 * The meter's U at the reading is an input here (computed by the meter model elsewhere).
 * Texts are data ({ code, text }): screens render them, nothing parses them.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { ChassisNetwork, NetworkError, validateEdges, type EdgeCurrent, type IndependenceCause, type NetworkEdge, type PartRelation, type PartRemoval } from './network';
import { NON_NETWORK_KINDS, type ComponentKind, type Method, type Verdict, type VerdictReason } from './words';

export { NetworkError } from './network';

/** An interval of ohms; `highOhms` null = unbounded above ("≥ lowOhms"). */
export interface OhmsInterval {
  lowOhms: number;
  highOhms: number | null;
}

/** A band of acceptable values for a part. */
export interface OhmsBand {
  lowOhms: number;
  highOhms: number;
}

export type ImpliedJudgement = Extract<Verdict, 'in-band' | 'high' | 'low' | 'inconclusive'>;

// ---------------------------------------------------------------------------------------------
// Notes (data, never parsed)

export type InCircuitNoteCode =
  | 'open-between-probes'
  | 'finite-reading-across-open'
  | 'part-left-out'
  | 'part-excluded'
  | 'shorted-by-tie'
  | 'elsewhere'
  | 'dead-end'
  | 'no-current'
  | 'linear-series-path'
  | 'not-explained-high'
  | 'not-explained-low'
  | 'implied-unbounded'
  | 'implied-at-zero'
  | 'interval-straddles-band'
  | 'no-band'
  | 'no-uncertainty'
  | 'tolerance-missing'
  | 'reading-below-healthy-range'
  | 'reading-above-healthy-range'
  | 'zero-ohm-parts-not-candidates';

export const IN_CIRCUIT_NOTE_TEXTS: Readonly<Record<InCircuitNoteCode, string>> = {
  'open-between-probes': 'No DC path joins the probes in this network: the meter should read open.',
  'finite-reading-across-open':
    'The network has no DC path between the probes, yet the meter reads a value: a path the network does not know (a short, leakage, a wiring change).',
  'part-left-out': 'This part is open or non-linear at DC (capacitor, rectifier): it is left out of the network and of the in-circuit reasoning.',
  'part-excluded': 'This part is out of circuit under these conditions.',
  'shorted-by-tie': "A zero-ohm tie joins the part's own two nodes: the reading cannot show the part.",
  elsewhere: 'The part is not on any path between the probes: the reading does not depend on it.',
  'dead-end': 'Seen from the probes the part leads to a dead end: no current flows in it and the reading does not depend on it.',
  'no-current': 'The part carries no current between these probes (a balanced bridge): the reading does not depend on it.',
  'linear-series-path': "The part is the only link between the probes' two sides: the reading is the part plus the rest of the series path.",
  'not-explained-high':
    'The reading is higher than the network reads with this part open: not explained by this part. Another part or a joint is high or open.',
  'not-explained-low': 'The reading is lower than the network reads with this part shorted: not explained by this part. Something else is low or shorted.',
  'implied-unbounded': 'The reading is close to what the network reads with the part open: the implied value has no upper bound.',
  'implied-at-zero': 'The reading is at what the network reads with this part shorted: the implied value is about 0 Ω.',
  'interval-straddles-band': "The interval of the implied value straddles a limit of the part's band: lift a lead to decide.",
  'no-band': 'No tolerance or band is known for this part: the implied value is not judged.',
  'no-uncertainty': "No meter uncertainty was given: the interval covers only the other parts' tolerances.",
  'tolerance-missing': 'Some parts have no tolerance and are taken at their nominal value.',
  'reading-below-healthy-range':
    'The reading is below what a healthy network reads between these probes: a part reads low or something is shorted; lift a lead to decide.',
  'reading-above-healthy-range':
    'The reading is above what a healthy network reads between these probes: a part in the path is high or open, or a joint or contact is bad.',
  'zero-ohm-parts-not-candidates': 'Zero-ohm ties are not listed as candidate parts.',
};

export interface InCircuitNote {
  code: InCircuitNoteCode;
  text: string;
  /** The edges the note is about, where it names some. */
  edgeIds?: string[];
}

function note(code: InCircuitNoteCode, edgeIds?: string[]): InCircuitNote {
  return edgeIds === undefined ? { code, text: IN_CIRCUIT_NOTE_TEXTS[code] } : { code, text: IN_CIRCUIT_NOTE_TEXTS[code], edgeIds };
}

const CAUSE_NOTES: Readonly<Record<IndependenceCause, InCircuitNoteCode>> = {
  'open-between-probes': 'open-between-probes',
  'not-in-network': 'part-excluded',
  'shorted-by-tie': 'shorted-by-tie',
  elsewhere: 'elsewhere',
  'dead-end': 'dead-end',
  'no-current': 'no-current',
};

// ---------------------------------------------------------------------------------------------
// Implied value and its judgement

/**
 * The raw implied value of the part for a reading (DESIGN.md §3.5): rank-one
 * R_x = t²/(R0 − R_m) − R_cd (R0·R_m/(R0 − R_m) for a component check), +Infinity where
 * R_m ≥ R0; linear R_x = R_m − (R_ac + R_db); NaN when the reading does not depend on the part.
 * May be negative (a reading below what the network reads with the part shorted).
 */
export function impliedOhms(removal: PartRemoval, readingOhms: number, componentCheck = false): number {
  if (removal.relation === 'linear') return readingOhms - removal.seriesOhms!;
  if (removal.relation === 'independent') return Number.NaN;
  const r0 = removal.r0Ohms!;
  if (readingOhms >= r0) return Number.POSITIVE_INFINITY;
  if (componentCheck) return (r0 * readingOhms) / (r0 - readingOhms);
  const t = removal.transferOhms!;
  return (t * t) / (r0 - readingOhms) - removal.rcdOhms!;
}

/**
 * The readings this part can explain, from shorted to open (rank-one: [R0 − t²/R_cd, R0];
 * linear: [R_ac + R_db, ∞)); null when the reading does not depend on the part.
 */
export function explainableReadings(removal: PartRemoval): OhmsInterval | null {
  if (removal.relation === 'linear') return { lowOhms: removal.seriesOhms!, highOhms: null };
  if (removal.relation === 'independent') return null;
  const t = removal.transferOhms!;
  return { lowOhms: Math.max(0, removal.r0Ohms! - (t * t) / removal.rcdOhms!), highOhms: removal.r0Ohms };
}

/** Inside the band → in-band; wholly above → high; wholly below → low; straddling → inconclusive. */
export function judgeImplied(interval: OhmsInterval, band: OhmsBand): ImpliedJudgement {
  if (interval.lowOhms > band.highOhms) return 'high';
  if (interval.highOhms !== null && interval.highOhms < band.lowOhms) return 'low';
  if (interval.lowOhms >= band.lowOhms && interval.highOhms !== null && interval.highOhms <= band.highOhms) return 'in-band';
  return 'inconclusive';
}

/** The network at nominal values and with every part at its lower, then upper tolerance limit. */
export interface ToleranceNetworks {
  nominal: ChassisNetwork;
  low: ChassisNetwork;
  high: ChassisNetwork;
}

export function toleranceNetworks(edges: readonly NetworkEdge[], options: { excludeEdgeIds?: Iterable<string> } = {}): ToleranceNetworks {
  const excludeEdgeIds = options.excludeEdgeIds === undefined ? undefined : [...options.excludeEdgeIds];
  const at = (sign: number) => (e: NetworkEdge) => e.ohms * (1 + (sign * (e.tolerancePct ?? 0)) / 100);
  return {
    nominal: new ChassisNetwork(edges, { excludeEdgeIds }),
    low: new ChassisNetwork(edges, { excludeEdgeIds, ohmsOf: at(-1) }),
    high: new ChassisNetwork(edges, { excludeEdgeIds, ohmsOf: at(+1) }),
  };
}

/** The in-circuit analysis of one part for one reading between the probes `from`, `to`. */
export interface PartAnalysis {
  edgeId: string;
  relation: PartRelation;
  cause: IndependenceCause | null;
  /** At nominal values of the other parts; null when unbounded, unexplained or independent. */
  impliedOhms: number | null;
  /** [R_x(R_m − U; others high), R_x(R_m + U; others low)]; null when unexplained or independent. */
  impliedInterval: OhmsInterval | null;
  /** null when the reading does not depend on the part. */
  explainable: boolean | null;
  /** The readings this part can explain with the others anywhere in their tolerance (before U). */
  explainableRange: OhmsInterval | null;
  /** The judgement of the interval against the band; null without a band or when independent. */
  verdict: ImpliedJudgement | null;
  reason: VerdictReason | null;
  /** The §3.5 quantities at nominal values. */
  removal: PartRemoval;
  notes: InCircuitNote[];
}

/**
 * Implied value, interval, explainability and judgement of one part (DESIGN.md §3.5). Rayleigh
 * monotonicity makes the implied value fall when any other part rises, so the interval takes the
 * others at their upper limits for its low end and at their lower limits for its high end.
 */
export function analysePart(
  nets: ToleranceNetworks,
  partId: string,
  from: string,
  to: string,
  readingOhms: number,
  uncertaintyOhms: number,
  band: OhmsBand | null,
  componentCheck = false,
): PartAnalysis {
  const nominal = nets.nominal.removal(partId, from, to);
  const base = { edgeId: partId, relation: nominal.relation, cause: nominal.cause, removal: nominal };
  if (nominal.relation === 'independent') {
    return { ...base, impliedOhms: null, impliedInterval: null, explainable: null, explainableRange: null, verdict: null, reason: null, notes: [note(CAUSE_NOTES[nominal.cause!])] };
  }
  const notes: InCircuitNote[] = [];
  if (nominal.relation === 'linear') notes.push(note('linear-series-path'));
  const low = nets.low.removal(partId, from, to);
  const high = nets.high.removal(partId, from, to);
  const lowRange = explainableReadings(low) ?? { lowOhms: low.r0Ohms ?? 0, highOhms: low.r0Ohms };
  const highRange = explainableReadings(high) ?? { lowOhms: high.r0Ohms ?? 0, highOhms: high.r0Ohms };
  const explainableRange: OhmsInterval = { lowOhms: lowRange.lowOhms, highOhms: highRange.highOhms };
  const u = uncertaintyOhms;
  const tooHigh = explainableRange.highOhms !== null && readingOhms - u > explainableRange.highOhms;
  const tooLow = readingOhms + u < explainableRange.lowOhms;
  if (tooHigh || tooLow) {
    notes.push(note(tooHigh ? 'not-explained-high' : 'not-explained-low'));
    return { ...base, impliedOhms: null, impliedInterval: null, explainable: false, explainableRange, verdict: 'inconclusive', reason: 'unexplained-in-circuit', notes };
  }
  const nominalValue = impliedOhms(nominal, readingOhms, componentCheck);
  let implied: number | null = nominalValue;
  if (!Number.isFinite(nominalValue)) implied = null;
  else if (nominalValue <= 0) {
    implied = 0;
    notes.push(note('implied-at-zero'));
  }
  // A corner where the part happens to carry no current (a bridge balanced there) bounds nothing.
  const lowRaw = impliedOhms(high, readingOhms - u, componentCheck);
  const highRaw = impliedOhms(low, readingOhms + u, componentCheck);
  const lowEnd = Number.isNaN(lowRaw) ? 0 : lowRaw;
  const highEnd = Number.isNaN(highRaw) ? Number.POSITIVE_INFINITY : highRaw;
  let interval: OhmsInterval | null = null;
  if (Number.isFinite(lowEnd)) {
    const hi = Number.isFinite(highEnd) ? Math.max(0, highEnd) : null;
    const lo = Math.max(0, hi === null ? lowEnd : Math.min(lowEnd, hi));
    interval = { lowOhms: lo, highOhms: hi };
  }
  if (interval === null || interval.highOhms === null) notes.push(note('implied-unbounded'));
  let verdict: ImpliedJudgement | null = null;
  let reason: VerdictReason | null = null;
  if (band === null) notes.push(note('no-band'));
  else {
    verdict = interval === null ? 'inconclusive' : judgeImplied(interval, band);
    if (verdict === 'inconclusive') {
      reason = 'unexplained-in-circuit';
      notes.push(note('interval-straddles-band'));
    }
  }
  return { ...base, impliedOhms: implied, impliedInterval: interval, explainable: true, explainableRange, verdict, reason, notes };
}

// ---------------------------------------------------------------------------------------------
// POST /api/calc/network

export interface InCircuitInput {
  edges: NetworkEdge[];
  from: string;
  to: string;
  /** The part under test; absent for a chart reading judged on its own. */
  partId?: string;
  readingOhms?: number;
  /** U at the reading (the meter model's expanded uncertainty); absent = 0, with a note. */
  uncertaintyOhms?: number;
  /** The part's acceptance band in signed percent, as the verdict takes it (−10 and +20 for −10 %/+20 %); else ± its tolerancePct. */
  band?: { lowPct: number; highPct: number };
}

/** A part that could explain a chart reading. */
export interface CandidatePart {
  edgeId: string;
  relation: Exclude<PartRelation, 'independent'>;
  impliedOhms: number | null;
  impliedInterval: OhmsInterval | null;
  explainable: boolean;
  verdict: ImpliedJudgement | null;
}

export interface InCircuitExplanation {
  /** How the reading depends on the part under test; null without a part. */
  relation: PartRelation | null;
  cause: IndependenceCause | null;
  reason: VerdictReason | null;
  /** True when the probes sit on the part's own nodes. */
  componentCheck: boolean;
  band: (OhmsBand & { source: 'input' | 'tolerance' }) | null;
  /** Readings the part can explain, the others anywhere in their tolerance, before U. */
  explainableRange: OhmsInterval | null;
  uncertaintyOhms: number | null;
  /** DESIGN.md §3.5 quantities at nominal values, the part removed. */
  quantities: { r0Ohms: number | null; rcdOhms: number | null; transferOhms: number | null; seriesOhms: number | null } | null;
  /**
   * The paths that carry the meter's current between the probes without the part under test
   * (all of them without a part): their resistance and each edge's share of the current.
   */
  parallelPaths: { ohms: number | null; edges: EdgeCurrent[] };
  /** For a chart reading: the implied value of each part the reading depends on. */
  candidates: CandidatePart[];
  leftOutEdgeIds: string[];
  notes: InCircuitNote[];
}

export interface InCircuitResult {
  open: boolean;
  effectiveOhms: number | null;
  impliedOhms: number | null;
  impliedInterval: OhmsInterval | null;
  explainable: boolean | null;
  healthyRange: OhmsBand | null;
  verdict: Verdict | null;
  explanation: InCircuitExplanation;
}

function isFiniteNonNegative(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x >= 0;
}

function validateInput(input: unknown): asserts input is InCircuitInput {
  if (typeof input !== 'object' || input === null) throw new NetworkError('body', 'the request must be an object');
  const i = input as Record<string, unknown>;
  validateEdges(i['edges']);
  const edges = i['edges'] as NetworkEdge[];
  const nodes = new Set<string>();
  for (const e of edges) nodes.add(e.a).add(e.b);
  for (const field of ['from', 'to'] as const) {
    const v = i[field];
    if (typeof v !== 'string' || v === '') throw new NetworkError(field, `${field} must name a node`);
    if (!nodes.has(v)) throw new NetworkError(field, `unknown node '${v}': no component connects to it`);
  }
  const partId = i['partId'];
  if (partId !== undefined) {
    if (typeof partId !== 'string') throw new NetworkError('partId', 'partId must be an edge id');
    if (!edges.some((e) => e.id === partId)) throw new NetworkError('partId', `part '${partId}' is not in the network`);
  }
  if (i['readingOhms'] !== undefined && !isFiniteNonNegative(i['readingOhms'])) throw new NetworkError('readingOhms', 'readingOhms must be a finite number of ohms, not negative');
  if (i['uncertaintyOhms'] !== undefined && !isFiniteNonNegative(i['uncertaintyOhms'])) throw new NetworkError('uncertaintyOhms', 'uncertaintyOhms must be a finite number of ohms, not negative');
  const band = i['band'];
  if (band !== undefined) {
    if (typeof band !== 'object' || band === null) throw new NetworkError('band', 'band must be { lowPct, highPct }');
    const b = band as Record<string, unknown>;
    const lowPct = b['lowPct'];
    if (typeof lowPct !== 'number' || !Number.isFinite(lowPct) || lowPct > 0 || lowPct <= -100)
      throw new NetworkError('band.lowPct', 'band.lowPct is the lower side in signed percent (write −10 for 10 % below): above −100 and at most 0');
    if (!isFiniteNonNegative(b['highPct'])) throw new NetworkError('band.highPct', 'band.highPct is the upper side in percent (20 for +20 %): 0 or more');
  }
}

/**
 * The whole in-circuit analysis of one test point, shaped as the answer of
 * `POST /api/calc/network`. Throws NetworkError (with `field`) on invalid input.
 */
export function analyseInCircuit(input: InCircuitInput): InCircuitResult {
  validateInput(input);
  const { edges, from, to, partId } = input;
  const nets = toleranceNetworks(edges);
  const byId = new Map(edges.map((e) => [e.id, e]));
  const notes: InCircuitNote[] = [];
  const effective = nets.nominal.resistance(from, to);
  const open = effective === null;
  const healthyRange = open ? null : { lowOhms: nets.low.resistance(from, to)!, highOhms: nets.high.resistance(from, to)! };
  const reading = input.readingOhms;
  const hasReading = reading !== undefined;
  const u = input.uncertaintyOhms ?? 0;
  const part = partId === undefined ? undefined : byId.get(partId)!;
  const componentCheck = part !== undefined && ((part.a === from && part.b === to) || (part.b === from && part.a === to));

  const missingTolerance = nets.nominal.includedEdgeIds.filter((id) => {
    const e = byId.get(id)!;
    return e.ohms > 0 && e.tolerancePct === undefined;
  });
  if (!open && missingTolerance.length > 0) notes.push(note('tolerance-missing', missingTolerance));
  if (hasReading && input.uncertaintyOhms === undefined) notes.push(note('no-uncertainty'));
  if (open) {
    notes.push(note('open-between-probes'));
    if (hasReading) notes.push(note('finite-reading-across-open'));
  } else if (hasReading && healthyRange !== null) {
    if (reading + u < healthyRange.lowOhms) notes.push(note('reading-below-healthy-range'));
    else if (reading - u > healthyRange.highOhms) notes.push(note('reading-above-healthy-range'));
  }

  let band: InCircuitExplanation['band'] = null;
  if (part !== undefined && part.ohms > 0) {
    if (input.band !== undefined) band = { lowOhms: part.ohms * (1 + input.band.lowPct / 100), highOhms: part.ohms * (1 + input.band.highPct / 100), source: 'input' };
    else if (part.tolerancePct !== undefined) band = { ...tolBand(part)!, source: 'tolerance' };
  }

  let analysis: PartAnalysis | null = null;
  let relation: PartRelation | null = null;
  let cause: IndependenceCause | null = null;
  let quantities: InCircuitExplanation['quantities'] = null;
  let partLeftOut = false;
  if (part !== undefined) {
    if (part.kind !== undefined && NON_NETWORK_KINDS.includes(part.kind)) {
      partLeftOut = true;
      notes.push(note('part-left-out'));
    } else if (hasReading) {
      analysis = analysePart(nets, part.id, from, to, reading, u, band === null ? null : { lowOhms: band.lowOhms, highOhms: band.highOhms }, componentCheck);
      notes.push(...analysis.notes.filter((n) => !(n.code === 'open-between-probes' && open)));
    }
    if (!partLeftOut) {
      const q = analysis?.removal ?? nets.nominal.removal(part.id, from, to);
      relation = q.relation;
      cause = q.cause;
      quantities = { r0Ohms: q.r0Ohms, rcdOhms: q.rcdOhms, transferOhms: q.transferOhms, seriesOhms: q.seriesOhms };
      if (analysis === null && q.relation === 'independent' && !(q.cause === 'open-between-probes' && open)) notes.push(note(CAUSE_NOTES[q.cause!]));
    }
  }

  const rest = part !== undefined && !partLeftOut && nets.nominal.ohmsOf(part.id) !== null ? nets.nominal.without(part.id) : nets.nominal;
  const parallelPaths = { ohms: rest.resistance(from, to), edges: rest.edgeCurrents(from, to) };

  const candidates: CandidatePart[] = [];
  if (hasReading && !componentCheck && !open) {
    let skippedTies = false;
    for (const id of nets.nominal.includedEdgeIds) {
      const e = byId.get(id)!;
      if (e.ohms === 0) {
        skippedTies = true;
        continue;
      }
      const a = id === partId && analysis !== null ? analysis : analysePart(nets, id, from, to, reading, u, tolBand(e), false);
      if (a.relation === 'independent') continue;
      candidates.push({ edgeId: id, relation: a.relation, impliedOhms: a.impliedOhms, impliedInterval: a.impliedInterval, explainable: a.explainable === true, verdict: a.verdict });
    }
    if (skippedTies) notes.push(note('zero-ohm-parts-not-candidates'));
  }

  return {
    open,
    effectiveOhms: effective,
    impliedOhms: analysis?.impliedOhms ?? null,
    impliedInterval: analysis?.impliedInterval ?? null,
    explainable: analysis?.explainable ?? null,
    healthyRange,
    verdict: analysis?.verdict ?? null,
    explanation: {
      relation,
      cause,
      reason: analysis?.reason ?? null,
      componentCheck,
      band,
      explainableRange: analysis?.explainableRange ?? null,
      uncertaintyOhms: hasReading ? u : null,
      quantities,
      parallelPaths,
      candidates,
      leftOutEdgeIds: [...nets.nominal.leftOutEdgeIds],
      notes,
    },
  };
}

function tolBand(e: NetworkEdge): OhmsBand | null {
  if (e.tolerancePct === undefined || !(e.ohms > 0)) return null;
  return { lowOhms: e.ohms * (1 - e.tolerancePct / 100), highOhms: e.ohms * (1 + e.tolerancePct / 100) };
}

// ---------------------------------------------------------------------------------------------
// Without a network (DESIGN.md §3.5, last bullet)

export type InCircuitCaveatCode =
  | 'lift-a-lead'
  | 'not-low-high-not-ruled-out'
  | 'path-high-check-joints'
  | 'path-open-check-joints'
  | 'short-suspect-parallel-capacitor'
  | 'short-lift-a-lead';

export const IN_CIRCUIT_CAVEATS: Readonly<Record<InCircuitCaveatCode, string>> = {
  'lift-a-lead': 'Low in circuit: a parallel path can read low. Lift one lead of the part and measure again to decide.',
  'not-low-high-not-ruled-out': 'Not low. In circuit a parallel path can hide a high part: high is not ruled out.',
  'path-high-check-joints': 'The path is high: check the joints and contacts, then the part.',
  'path-open-check-joints': 'The path is open: check the joints and contacts, then the part.',
  'short-suspect-parallel-capacitor': 'A short across a resistor points first at a shorted capacitor in parallel: lift a lead to decide.',
  'short-lift-a-lead': 'A short in circuit may be a tie or another part in parallel: lift a lead to decide.',
};

export interface InCircuitCaveat {
  code: InCircuitCaveatCode;
  text: string;
}

export interface NoNetworkContext {
  method: Method;
  kind?: ComponentKind;
  /** The joints and contacts of the path are marked checked (needed before a high or open counts). */
  jointsChecked?: boolean;
  /** The reason carried by an incoming inconclusive or not-read verdict. */
  reason?: VerdictReason | null;
}

export interface NoNetworkAdvice {
  verdict: Verdict;
  reason: VerdictReason | null;
  /** True when the verdict is evidence about the part itself (for the replacement list). */
  conclusive: boolean;
  caveats: InCircuitCaveat[];
}

const RESISTOR_KINDS: readonly ComponentKind[] = ['carbon-composition', 'carbon-film', 'metal-film', 'wirewound', 'pot'];

function caveat(code: InCircuitCaveatCode): InCircuitCaveat {
  return { code, text: IN_CIRCUIT_CAVEATS[code] };
}

/**
 * What a verdict on a reading may claim when no network is known (DESIGN.md §3.5): on the part's
 * own leads the verdict stands; in circuit a low is inconclusive (`unexplained-in-circuit`), an
 * in-band reading is "not low; high not ruled out", a high or open path sends the user to the
 * joints and contacts first, and a short across a resistor points at a capacitor in parallel.
 */
export function noNetworkAdvice(verdictOfReading: Verdict, context: NoNetworkContext): NoNetworkAdvice {
  const reason = verdictOfReading === 'inconclusive' || verdictOfReading === 'not-read' ? (context.reason ?? null) : null;
  if (context.method !== 'in-circuit') {
    return { verdict: verdictOfReading, reason, conclusive: verdictOfReading !== 'inconclusive' && verdictOfReading !== 'not-read', caveats: [] };
  }
  switch (verdictOfReading) {
    case 'low':
      return { verdict: 'inconclusive', reason: 'unexplained-in-circuit', conclusive: false, caveats: [caveat('lift-a-lead')] };
    case 'in-band':
    case 'near-limit':
      return { verdict: verdictOfReading, reason: null, conclusive: false, caveats: [caveat('not-low-high-not-ruled-out')] };
    case 'high':
      return { verdict: 'high', reason: null, conclusive: context.jointsChecked === true, caveats: [caveat('path-high-check-joints')] };
    case 'open':
      return { verdict: 'open', reason: null, conclusive: context.jointsChecked === true, caveats: [caveat('path-open-check-joints')] };
    case 'short': {
      const resistor = context.kind !== undefined && RESISTOR_KINDS.includes(context.kind);
      return { verdict: 'short', reason: null, conclusive: false, caveats: [caveat(resistor ? 'short-suspect-parallel-capacitor' : 'short-lift-a-lead')] };
    }
    case 'inconclusive':
    case 'not-read':
      return { verdict: verdictOfReading, reason, conclusive: false, caveats: [] };
  }
}
