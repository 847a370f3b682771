import type { InCircuitResult } from '@domain/in-circuit';
import { NetworkError, type NetworkEdge } from '@domain/network';
import { parseResistance } from '@domain/notation';
import { QuickCheckError, checkNetwork, type NetworkRequest } from '@domain/quick-check';
import { COMPONENT_KINDS, NON_NETWORK_KINDS, type ComponentKind } from '@domain/words';
import { parsePlainNumber } from '../calc-format';
import { sameNumber } from '../confirmation';
import type { MeterChoice } from '../meter-editor/meter-form';

/** One row of the network as typed: ohms as a technician writes them, tolerance in %. */
export interface EdgeRowValue {
  id: string;
  a: string;
  b: string;
  ohms: string;
  kind: ComponentKind | '';
  tolerance: string;
}

export interface NetworkFormValue {
  rows: EdgeRowValue[];
  from: string;
  to: string;
  /** '' = no part under test (a chart reading judged on its own). */
  partId: string;
  reading: string;
}

/** A row as an edge, or what is wrong with it (each message names the cell). */
export function edgeOfRow(row: EdgeRowValue): { edge: NetworkEdge | null; problems: string[] } {
  const problems: string[] = [];
  const id = row.id.trim();
  const a = row.a.trim();
  const b = row.b.trim();
  if (!id) problems.push('id: give the part a reference (R12, C8…)');
  if (!a) problems.push('node a: name a node (V3.7, chassis, B+…)');
  if (!b) problems.push('node b: name a node');
  if (a && b && a === b) problems.push(`nodes: ${id || 'the part'} joins ${a} to itself`);
  const kind = row.kind === '' ? undefined : row.kind;
  if (kind !== undefined && !COMPONENT_KINDS.includes(kind)) problems.push(`kind: '${kind}' is not a kind (${COMPONENT_KINDS.join(', ')})`);
  const leftOut = kind !== undefined && NON_NETWORK_KINDS.includes(kind);
  let ohms = 0;
  if (!(leftOut && row.ohms.trim() === '')) {
    const parsed = parseResistance(row.ohms);
    if (!parsed.ok) problems.push(`ohms: ${parsed.message}`);
    else if (parsed.state === 'short') ohms = 0;
    else if (parsed.state !== 'value' || parsed.ohms === null) problems.push(`ohms: '${row.ohms}' is a reading state; a part needs a value (or short for a tie)`);
    else ohms = parsed.ohms;
  }
  let tolerancePct: number | undefined;
  if (row.tolerance.trim() !== '') {
    const t = parsePlainNumber(row.tolerance);
    if (t === null || t < 0 || t >= 100) problems.push(`tolerance: '${row.tolerance}' is not a percentage from 0 up to 100`);
    else tolerancePct = t;
  }
  if (problems.length) return { edge: null, problems };
  const edge: NetworkEdge = { id, a, b, ohms };
  if (kind !== undefined) edge.kind = kind;
  if (tolerancePct !== undefined) edge.tolerancePct = tolerancePct;
  return { edge, problems };
}

export type NetworkField = 'rows' | 'from' | 'to' | 'partId' | 'reading' | 'form';

export type LocalNetworkCheck =
  | { readonly ok: true; readonly request: NetworkRequest; readonly result: InCircuitResult }
  | { readonly ok: false; readonly problems: readonly { field: NetworkField; message: string }[] };

/** Domain field names (`edges[3].ohms`, `from`…) as the form shows them (`row 4: …`). */
function placeOf(field: string, message: string): { field: NetworkField; message: string } {
  const m = /^edges\[(\d+)\]/.exec(field);
  if (m) return { field: 'rows', message: `row ${Number(m[1]) + 1}: ${message}` };
  if (field === 'from' || field === 'to' || field === 'partId') return { field, message };
  if (field === 'readingOhms') return { field: 'reading', message };
  return { field: 'form', message };
}

/** The form as a `POST /api/calc/network` request, analysed at once with the function the API calls. */
export function localNetworkCheck(v: NetworkFormValue, meter: MeterChoice | null): LocalNetworkCheck {
  const problems: { field: NetworkField; message: string }[] = [];
  const edges: NetworkEdge[] = [];
  const seen = new Map<string, number>();
  v.rows.forEach((row, i) => {
    const { edge, problems: p } = edgeOfRow(row);
    for (const message of p) problems.push({ field: 'rows', message: `row ${i + 1}: ${message}` });
    if (edge) {
      const before = seen.get(edge.id);
      if (before !== undefined) problems.push({ field: 'rows', message: `row ${i + 1}: ${edge.id} is already row ${before + 1}` });
      seen.set(edge.id, i);
      edges.push(edge);
    }
  });
  if (v.rows.length === 0) problems.push({ field: 'rows', message: 'add at least one part' });
  if (!v.from) problems.push({ field: 'from', message: 'choose the node of one probe' });
  if (!v.to) problems.push({ field: 'to', message: 'choose the node of the other probe' });
  if (v.from && v.from === v.to) problems.push({ field: 'to', message: 'the probes are on the same node' });
  const request: NetworkRequest = { edges, from: v.from, to: v.to };
  if (v.partId) request.partId = v.partId;
  if (v.reading.trim() !== '') {
    const reading = parseResistance(v.reading);
    if (!reading.ok) problems.push({ field: 'reading', message: reading.message });
    else if (reading.state === 'short') request.readingOhms = 0;
    else if (reading.state !== 'value' || reading.ohms === null) {
      problems.push({ field: 'reading', message: `'${v.reading}': the in-circuit reasoning needs a value; ${reading.display} is judged in the reading check above` });
    } else request.readingOhms = reading.ohms;
  }
  if (meter && request.readingOhms !== undefined) request.meter = meter.meter;
  if (problems.length) return { ok: false, problems };
  try {
    return { ok: true, request, result: checkNetwork(request) };
  } catch (e) {
    if (e instanceof QuickCheckError || e instanceof NetworkError) return { ok: false, problems: [placeOf(e.field, e.message)] };
    throw e;
  }
}

/** Where the server's analysis differs from this page's, in words (empty: they agree). */
export function networkDifferences(local: InCircuitResult, server: InCircuitResult): string[] {
  const out: string[] = [];
  if (local.open !== server.open) out.push('open or not');
  if (!sameNumber(local.effectiveOhms, server.effectiveOhms)) out.push('the effective resistance differs');
  if (!sameNumber(local.impliedOhms, server.impliedOhms)) out.push('the implied value differs');
  if (!sameNumber(local.impliedInterval?.lowOhms, server.impliedInterval?.lowOhms) || !sameNumber(local.impliedInterval?.highOhms, server.impliedInterval?.highOhms)) {
    out.push('the interval differs');
  }
  if (local.explainable !== server.explainable) out.push('explainable or not');
  if (!sameNumber(local.healthyRange?.lowOhms, server.healthyRange?.lowOhms) || !sameNumber(local.healthyRange?.highOhms, server.healthyRange?.highOhms)) {
    out.push('the healthy range differs');
  }
  if (local.verdict !== server.verdict) out.push(`the server says ${server.verdict ?? 'no verdict'}, this page ${local.verdict ?? 'no verdict'}`);
  return out;
}
