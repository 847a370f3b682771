import type { TemplateDocument, TemplateProblem } from '@domain/template-format';

/** Where in the editor a problem belongs: the item (by its stable key) and the field inside it. */
export type ProblemTarget =
  | { kind: 'chassis'; field: string }
  | { kind: 'conditions'; field: string }
  | { kind: 'stage'; key: string; field: string }
  | { kind: 'socket'; stageKey: string; key: string; field: string }
  | { kind: 'junction'; index: number; field: string }
  | { kind: 'component'; key: string; stageKey: string; field: string }
  | { kind: 'test-point'; key: string; stageKey: string; field: string }
  | { kind: 'document'; field: string };

export interface PlacedProblem extends TemplateProblem {
  /** The path inside the document (the API's `content.` prefix removed). */
  path: string;
  target: ProblemTarget;
  severity: 'error' | 'warning';
  /** Where it was found: the server refused the save, or the browser's own network check. */
  origin: 'server' | 'network' | 'capacitors';
}

/** `content.components[3].nodes[1]` → `components[3].nodes[1]` (the API prefixes the body field). */
export function documentPath(path: string): string {
  return path.replace(/^content(\.|(?=\[)|$)/, '');
}

const INDEXED = /^(stages|components|testPoints|junctions)\[(\d+)\](?:\.(.*))?$/;

/**
 * Places a document path on the item it names, by key, in the document the path was found in
 * (indices of the document that was saved: the keys survive later reordering).
 */
export function targetOf(path: string, doc: TemplateDocument): ProblemTarget {
  const p = documentPath(path);
  if (p.startsWith('chassis')) return { kind: 'chassis', field: p.replace(/^chassis\.?/, '') };
  if (p.startsWith('conditions')) return { kind: 'conditions', field: p.replace(/^conditions\.?/, '') };
  const m = INDEXED.exec(p);
  if (m === null) return { kind: 'document', field: p };
  const [, list, indexText, restText] = m;
  const index = Number(indexText);
  const rest = restText ?? '';
  switch (list) {
    case 'stages': {
      const stage = doc.stages[index];
      if (stage === undefined) return { kind: 'document', field: p };
      const so = /^sockets\[(\d+)\](?:\.(.*))?$/.exec(rest);
      if (so !== null) {
        const socket = stage.sockets[Number(so[1])];
        if (socket !== undefined) return { kind: 'socket', stageKey: stage.key, key: socket.key, field: so[2] ?? '' };
      }
      return { kind: 'stage', key: stage.key, field: rest };
    }
    case 'components': {
      const c = doc.components[index];
      return c === undefined ? { kind: 'document', field: p } : { kind: 'component', key: c.key, stageKey: c.stageKey, field: rest };
    }
    case 'testPoints': {
      const tp = doc.testPoints[index];
      return tp === undefined ? { kind: 'document', field: p } : { kind: 'test-point', key: tp.key, stageKey: tp.stageKey, field: rest };
    }
    default:
      return { kind: 'junction', index, field: rest };
  }
}

/** Places each problem found in `doc`. */
export function placeProblems(
  problems: readonly (TemplateProblem & { severity?: 'error' | 'warning' })[],
  doc: TemplateDocument,
  origin: PlacedProblem['origin'],
): PlacedProblem[] {
  return problems.map((pr) => ({
    path: documentPath(pr.path),
    message: pr.message,
    severity: pr.severity ?? 'error',
    origin,
    target: targetOf(pr.path, doc),
  }));
}

/** Does a problem's field belong under `field` (`nodes` covers `nodes[1]`; `capacitor` covers `capacitor.uF`)? */
export function fieldMatches(problemField: string, field: string): boolean {
  return problemField === field || problemField.startsWith(`${field}.`) || problemField.startsWith(`${field}[`);
}

/** The item a problem belongs to, in words, for the problem list. */
export function describeTarget(t: ProblemTarget, doc: TemplateDocument): string {
  switch (t.kind) {
    case 'chassis':
      return `Chassis${t.field ? ` · ${t.field}` : ''}`;
    case 'conditions':
      return `Conditions${t.field ? ` · ${t.field}` : ''}`;
    case 'stage':
      return `Stage ${doc.stages.find((s) => s.key === t.key)?.name ?? ''}${t.field ? ` · ${t.field}` : ''}`;
    case 'socket': {
      const s = doc.stages.find((x) => x.key === t.stageKey)?.sockets.find((x) => x.key === t.key);
      return `Socket ${s?.designator ?? ''}${t.field ? ` · ${t.field}` : ''}`;
    }
    case 'junction':
      return `Junction ${doc.junctions[t.index]?.name ?? t.index + 1}${t.field ? ` · ${t.field}` : ''}`;
    case 'component':
      return `${doc.components.find((c) => c.key === t.key)?.ref ?? 'Component'}${t.field ? ` · ${t.field}` : ''}`;
    case 'test-point': {
      const i = doc.testPoints.findIndex((x) => x.key === t.key);
      return `Test point ${i + 1}${t.field ? ` · ${t.field}` : ''}`;
    }
    default:
      return t.field || 'Document';
  }
}
