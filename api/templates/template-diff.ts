/**
 * The difference between two versions of a template: components and test points added, removed
 * and changed, joined on their stable keys (never on position or reference). A changed item lists
 * the fields that differ; a move in bench order alone is reported as `order` among the fields.
 */
import type { Component, TemplateDocument, TestPoint } from '../domain/template-format';
import { canonicalDocument } from './canonical';

export interface DiffEntry<T> {
  key: string;
  /** Reference of a component, or the test point's kind, to name the item on screen. */
  label: string;
  before?: T;
  after?: T;
  /** Changed items only: the fields that differ. */
  fields?: string[];
}

export interface DiffSection<T> {
  added: DiffEntry<T>[];
  removed: DiffEntry<T>[];
  changed: DiffEntry<T>[];
}

export interface TemplateDiff {
  components: DiffSection<Component>;
  testPoints: DiffSection<TestPoint>;
  /** Chassis fields that differ (maker, model …). */
  chassis: string[];
  /** Stages added or removed, by key. */
  stages: { added: string[]; removed: string[]; changed: string[] };
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

function section<T extends { key: string }>(before: readonly T[], after: readonly T[], labelOf: (t: T) => string): DiffSection<T> {
  const b = new Map(before.map((t, i) => [t.key, { t, i }]));
  const a = new Map(after.map((t, i) => [t.key, { t, i }]));
  const out: DiffSection<T> = { added: [], removed: [], changed: [] };
  // Order within the list is compared among the keys both versions share.
  const sharedBefore = before.filter((t) => a.has(t.key)).map((t) => t.key);
  const sharedAfter = after.filter((t) => b.has(t.key)).map((t) => t.key);
  for (const [key, { t }] of a) {
    const old = b.get(key);
    if (!old) {
      out.added.push({ key, label: labelOf(t), after: t });
      continue;
    }
    const fields = [...new Set([...Object.keys(old.t), ...Object.keys(t)])].filter((f) => !same((old.t as Record<string, unknown>)[f], (t as Record<string, unknown>)[f]));
    if (sharedBefore.indexOf(key) !== sharedAfter.indexOf(key)) fields.push('order');
    if (fields.length) out.changed.push({ key, label: labelOf(t), before: old.t, after: t, fields });
  }
  for (const [key, { t }] of b) if (!a.has(key)) out.removed.push({ key, label: labelOf(t), before: t });
  return out;
}

export function diffDocuments(fromDoc: TemplateDocument, toDoc: TemplateDocument): TemplateDiff {
  const from = canonicalDocument(fromDoc);
  const to = canonicalDocument(toDoc);
  const chassis = Object.keys(to.chassis).filter((k) => !same((from.chassis as unknown as Record<string, unknown>)[k], (to.chassis as unknown as Record<string, unknown>)[k]));
  const sb = new Map(from.stages.map((s) => [s.key, s]));
  const sa = new Map(to.stages.map((s) => [s.key, s]));
  return {
    components: section(from.components, to.components, (c) => c.ref),
    testPoints: section(from.testPoints, to.testPoints, (t) => (t.kind === 'component-check' ? `check of ${to.components.find((c) => c.key === t.componentKey)?.ref ?? from.components.find((c) => c.key === t.componentKey)?.ref ?? t.componentKey}` : t.kind === 'chart-reading' ? `${t.from} to ${t.to}` : `pair ${t.a}/${t.b}`)),
    chassis,
    stages: {
      added: [...sa.keys()].filter((k) => !sb.has(k)),
      removed: [...sb.keys()].filter((k) => !sa.has(k)),
      changed: [...sa.keys()].filter((k) => sb.has(k) && !same(sb.get(k), sa.get(k))),
    },
  };
}
