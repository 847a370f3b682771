/**
 * Group `domain`: the computation in process (api/domain), timed with performance.now() after a
 * warm-up. Targets from issue 3, "Speed".
 */
import { analysePart, toleranceNetworks, type OhmsBand } from '../api/domain/in-circuit';
import { expandedUncertainty } from '../api/domain/meter';
import { ChassisNetwork, effectiveResistance, type NetworkEdge } from '../api/domain/network';
import { checkNetwork, checkReading, type VerdictRequest } from '../api/domain/quick-check';
import { DIGITAL_METER, GUARDED_RULE, randomNetwork, surveyRequests } from './lib/fixtures';
import { mulberry32 } from './lib/prng';
import { consume, progress, round, timeIt, type Figure, type Timing } from './lib/stats';

const ISSUE = 'issue 3, Speed';

function timed(figure: string, t: Timing, target: number | null, extra: Record<string, unknown> = {}): Figure {
  return {
    figure,
    value: round(t.medianMs),
    unit: 'ms',
    stat: 'median',
    p95: round(t.p95Ms),
    min: round(t.minMs),
    cpuMedian: round(t.cpuMedianMs),
    iterations: t.iterations,
    target,
    ...(target !== null ? { source: ISSUE } : {}),
    ...extra,
  };
}

const tolBand = (e: NetworkEdge): OhmsBand => ({ lowOhms: e.ohms * (1 - (e.tolerancePct ?? 0) / 100), highOhms: e.ohms * (1 + (e.tolerancePct ?? 0) / 100) });

/** One in-circuit component check of a survey with a network. */
interface NetworkReading {
  edge: NetworkEdge;
  ohms: number;
  request: VerdictRequest;
}

/**
 * 400 component checks across the parts of the network, read on the set as found: about 15 % of
 * the parts drifted up 10–50 %, 3 % down 30 %, 2 % open; the readings are what that network shows
 * between each part's two nodes, as the meter displays them (rounded to 3 figures, lead added).
 */
export function networkSurvey(edges: NetworkEdge[], count: number, seed: number): NetworkReading[] {
  const rng = mulberry32(seed);
  const open: string[] = [];
  const asFound = new Map<string, number>();
  for (const e of edges) {
    const r = rng();
    if (r < 0.02) open.push(e.id);
    else if (r < 0.05) asFound.set(e.id, e.ohms * 0.7);
    else if (r < 0.2) asFound.set(e.id, e.ohms * (1.1 + rng() * 0.4));
  }
  const found = new ChassisNetwork(edges, { excludeEdgeIds: open, ohmsOf: (e) => asFound.get(e.id) ?? e.ohms });
  const out: NetworkReading[] = [];
  for (let i = 0; i < count; i++) {
    const edge = edges[(i * 7 + Math.floor(i / edges.length)) % edges.length];
    const r = found.resistance(edge.a, edge.b);
    const displayed = r === null ? null : Number(r.toPrecision(3)) + DIGITAL_METER.leadOhms;
    if (displayed === null) continue;
    out.push({
      edge,
      ohms: displayed,
      request: { expected: edge.ohms, tolerancePct: edge.tolerancePct, kind: edge.kind, method: 'in-circuit', rule: GUARDED_RULE, meter: DIGITAL_METER, reading: displayed },
    });
  }
  return out;
}

/** Recompute a survey with a network: tolerance networks built once, then each reading's verdict and in-circuit analysis. */
export function recomputeNetworkSurvey(edges: NetworkEdge[], readings: NetworkReading[]): number {
  const nets = toleranceNetworks(edges);
  let acc = 0;
  for (const r of readings) {
    const verdict = checkReading(r.request);
    const u = expandedUncertainty(DIGITAL_METER, r.ohms);
    const part = analysePart(nets, r.edge.id, r.edge.a, r.edge.b, r.ohms - DIGITAL_METER.leadOhms, u, tolBand(r.edge), true);
    const low = nets.low.resistance(r.edge.a, r.edge.b);
    const high = nets.high.resistance(r.edge.a, r.edge.b);
    acc += (part.impliedOhms ?? 0) + (low ?? 0) + (high ?? 0) + (verdict.driftPct ?? 0) + (part.verdict === null ? 0 : 1);
  }
  return acc;
}

/** A part on a cycle (its removal is a rank-one update), for the single-part figures. */
function partOnCycle(edges: NetworkEdge[]): NetworkEdge {
  const net = new ChassisNetwork(edges);
  for (let i = edges.length - 1; i >= 0; i--) {
    const e = edges[i];
    if (net.removal(e.id, e.a, e.b).relation === 'rank-one') return e;
  }
  throw new Error('no part on a cycle');
}

/** Implied value with interval, healthy range and judgement of one part, building what it needs. */
function onePart(edges: NetworkEdge[], part: NetworkEdge, readingOhms: number): number {
  const nets = toleranceNetworks(edges);
  const u = expandedUncertainty(DIGITAL_METER, readingOhms);
  const a = analysePart(nets, part.id, part.a, part.b, readingOhms, u, tolBand(part), true);
  const low = nets.low.resistance(part.a, part.b)!;
  const high = nets.high.resistance(part.a, part.b)!;
  return (a.impliedInterval?.lowOhms ?? 0) + low + high;
}

export async function runDomain(emit: (f: Figure) => void): Promise<void> {
  // 1. A 400-reading survey without a network, through the API's own function.
  const survey = surveyRequests(400);
  const counts = new Map<string, number>();
  for (const r of survey) {
    const v = checkReading(r);
    counts.set(v.verdict, (counts.get(v.verdict) ?? 0) + 1);
  }
  progress(`survey without a network: verdict mix ${JSON.stringify(Object.fromEntries(counts))}`);
  const t1 = timeIt(
    () => {
      let acc = 0;
      for (const r of survey) acc += checkReading(r).explanation.notes.length;
      return acc;
    },
    { warmupMs: 500, minMs: 3000, minIterations: 200 },
  );
  emit(timed('domain.survey-400.no-network', t1, 5, { readings: survey.length, per: '400 readings', function: 'checkReading (api/domain/quick-check.ts)' }));

  // 2. The same size of survey with a chassis network of 80 nodes.
  const net80 = randomNetwork(80, 120);
  const readings80 = networkSurvey(net80, 400, 0xbe7c4);
  progress(`network survey: ${readings80.length} component checks on ${net80.length} edges, 80 nodes`);
  const t2 = timeIt(() => recomputeNetworkSurvey(net80, readings80), { warmupMs: 1000, minMs: 4000, minIterations: 30 });
  emit(
    timed('domain.survey-400.network-80', t2, 50, {
      readings: readings80.length,
      nodes: 80,
      edges: net80.length,
      per: '400 readings: toleranceNetworks once, then per reading checkReading + U + analysePart + healthy range',
    }),
  );

  // 3. One grounded solve (factorization + solve), 80 nodes (target) and 200 nodes (information).
  for (const [nodes, target] of [
    [80, 0.3],
    [200, null],
  ] as const) {
    const edges = randomNetwork(nodes);
    const far = edges[edges.length - 1];
    consume(effectiveResistance(edges, 'chassis', far.a));
    const t = timeIt(() => effectiveResistance(edges, 'chassis', far.a), { warmupMs: 300, minMs: 1500, minIterations: 200 });
    emit(timed(`domain.solve.${nodes}-nodes`, t, target, { nodes, edges: edges.length, per: 'effectiveResistance: validate, factor, solve' }));
  }

  // 4. Implied value with interval and healthy range for one part, building what it needs.
  for (const [nodes, target] of [
    [80, 1.5],
    [200, null],
  ] as const) {
    const edges = nodes === 80 ? net80 : randomNetwork(nodes);
    const part = partOnCycle(edges);
    const reading = new ChassisNetwork(edges).resistance(part.a, part.b)! * 1.05;
    const t = timeIt(() => onePart(edges, part, reading), { warmupMs: 300, minMs: 1500, minIterations: 100 });
    emit(timed(`domain.implied-one-part.${nodes}-nodes`, t, target, { nodes, edges: edges.length, per: 'toleranceNetworks + analysePart + healthy range' }));
    // For information: the whole POST /api/calc/network composition (adds the parallel paths and their currents).
    const tn = timeIt(() => checkNetwork({ edges, from: part.a, to: part.b, partId: part.id, readingOhms: reading, meter: DIGITAL_METER }), {
      warmupMs: 200,
      minMs: 1000,
      minIterations: 50,
    });
    emit(timed(`domain.check-network.${nodes}-nodes`, tn, null, { nodes, edges: edges.length, per: 'checkNetwork (the API composition), component check' }));
  }
}
