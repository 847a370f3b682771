import { FIXED_NODES, parseNodeName, type TemplateDocument, type TubeTypeRecord } from '@domain/template-format';

/** A node the author may type, with words to recognise it by. */
export interface NodeOption {
  name: string;
  label: string;
}

const FIXED_LABELS: Readonly<Record<string, string>> = { chassis: 'the chassis', 'B-': 'the B− bus', 'B+': 'B+' };

/** Every node of the document: the sockets' pins (IC pins left out: never tie points), the fixed nodes, the junctions. */
export function nodeOptions(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>): NodeOption[] {
  const out: NodeOption[] = FIXED_NODES.map((n) => ({ name: n, label: FIXED_LABELS[n] }));
  for (const j of doc.junctions) out.push({ name: j.name, label: j.note ? `junction · ${j.note}` : 'junction' });
  for (const st of doc.stages) {
    for (const so of st.sockets) {
      const tt = tubeTypes.get(so.tubeType);
      if (tt === undefined) continue;
      for (const p of tt.pins) {
        if (p.electrode === 'IC') continue;
        out.push({ name: `${so.designator}.${p.pin}`, label: `${so.designator} ${so.tubeType} pin ${p.pin} · ${p.electrode === 'NC' ? 'NC (tie point)' : p.label}` });
      }
    }
  }
  return out;
}

/** The options that match what is typed (name prefix first, then any word of the label). */
export function filterNodes(options: readonly NodeOption[], typed: string, limit = 40): NodeOption[] {
  const t = typed.trim().toLowerCase();
  if (t === '') return options.slice(0, limit);
  const starts = options.filter((o) => o.name.toLowerCase().startsWith(t));
  const rest = options.filter((o) => !o.name.toLowerCase().startsWith(t) && o.label.toLowerCase().includes(t));
  return [...starts, ...rest].slice(0, limit);
}

/** How a typed node name stands: known, a new junction name, or a problem in words. */
export type NodeStanding = { kind: 'known' } | { kind: 'new-junction' } | { kind: 'problem'; message: string };

export function nodeStanding(name: string, doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypeRecord>): NodeStanding {
  const n = name.trim();
  if (n === '') return { kind: 'problem', message: 'a node is missing' };
  const parsed = parseNodeName(n);
  if (parsed.kind === 'fixed') return { kind: 'known' };
  if (doc.junctions.some((j) => j.name === n)) return { kind: 'known' };
  if (parsed.kind === 'other') {
    if (/^(chassis|b-|b\+|gnd|ground)$/i.test(n)) return { kind: 'problem', message: `'${n}': write chassis, B- or B+ exactly` };
    return { kind: 'new-junction' };
  }
  const socket = doc.stages.flatMap((s) => s.sockets).find((s) => s.designator === parsed.designator);
  if (socket === undefined) return { kind: 'problem', message: `'${n}': there is no socket ${parsed.designator}` };
  const tt = tubeTypes.get(socket.tubeType);
  if (tt === undefined) return { kind: 'known' }; // the socket's tube type is reported on the socket
  const pin = tt.pins.find((p) => p.pin === parsed.pin);
  if (pin === undefined) return { kind: 'problem', message: `'${n}': the ${tt.designation} has no pin ${parsed.pin}` };
  if (pin.electrode === 'IC') return { kind: 'problem', message: `'${n}': pin ${parsed.pin} of the ${tt.designation} is IC (internally connected), never a tie point` };
  return { kind: 'known' };
}
