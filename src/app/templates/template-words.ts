import { formatOhms } from '@domain/notation';
import type { ChassisKind, Component, Electrode, Expected, Heating, Nominal, PowerArrangement, TemplateDocument, TestConditions, TestPoint } from '@domain/template-format';
import type { TemplateVersionState, ValueSource } from '@domain/words';
import type { TemplateVisibility } from './templates-api';

/** Screen words for the API words of the templates feature (DESIGN.md §2). */
export const CHASSIS_KIND_LABELS: Readonly<Record<ChassisKind, string>> = {
  'table-radio': 'table radio',
  console: 'console',
  portable: 'portable',
  'communications-receiver': 'communications receiver',
  amplifier: 'amplifier',
  other: 'other',
};

export const POWER_LABELS: Readonly<Record<PowerArrangement, string>> = {
  transformer: 'transformer',
  autotransformer: 'autotransformer',
  'ac-dc': 'AC/DC (transformerless)',
  battery: 'battery',
};

export const VISIBILITY_LABELS: Readonly<Record<TemplateVisibility, string>> = {
  private: 'private',
  shared: 'shared with named users',
  public: 'public in the library',
};

export const VISIBILITY_ICONS: Readonly<Record<TemplateVisibility, string>> = { private: 'lock', shared: 'group', public: 'public' };

/** A version's state: the word and an icon (never colour alone). */
export const VERSION_STATE_ICONS: Readonly<Record<TemplateVersionState, string>> = { draft: 'edit_note', published: 'verified', retired: 'archive' };

export const HEATING_LABELS: Readonly<Record<Heating, string>> = { indirect: 'indirectly heated (heater)', direct: 'directly heated (filament)' };

export const ELECTRODE_LABELS: Readonly<Record<Electrode, string>> = {
  p: 'plate',
  g: 'grid',
  g1: 'grid 1',
  g2: 'grid 2 (screen)',
  g3: 'grid 3',
  g4: 'grid 4',
  g5: 'grid 5',
  k: 'cathode',
  d: 'diode plate',
  h: 'heater',
  hct: 'heater centre tap',
  htap: 'heater tap',
  f: 'filament',
  fct: 'filament centre tap',
  s: 'internal shield',
  NC: 'NC — no connection (a tie point)',
  IC: 'IC — internally connected (never a tie point)',
};

export const VALUE_SOURCE_LABELS: Readonly<Record<ValueSource, string>> = {
  'service-data': 'service data',
  'known-good-set': 'measured on a known-good set',
  schematic: 'derived from the schematic',
};

export const TEST_POINT_KIND_LABELS: Readonly<Record<TestPoint['kind'], string>> = {
  'component-check': 'component check',
  'chart-reading': 'chart reading',
  'pair-relation': 'pair relation',
};

/** The kind words of components: `carbon-composition` → `carbon composition`. */
export const kindWords = (kind: string): string => kind.replace(/-/g, ' ');

/** The hot-chassis caution (DESIGN.md §5). */
export const HOT_CHASSIS_CAUTION =
  'Hot chassis: the chassis may be at mains potential. Work through an isolation transformer; a variac isolates nothing. Defer to local codes and licensed practice.';

/** `4.7 kΩ (4K7)`, or a state as charts print it. */
export function nominalText(n: Nominal | Expected): string {
  if ('state' in n) return n.state === 'open' ? 'open (∞)' : 'short (0 Ω)';
  const shown = formatOhms(n.ohms);
  const typed = 'text' in n ? n.text : undefined;
  // The typed text adds something only when it is a letter code (4K7, R47, 1M2).
  return typed && /\d[RKMG]\d|^R\d/i.test(typed.trim()) ? `${shown} (${typed.trim()})` : shown;
}

export function toleranceText(pct: number | null | undefined): string {
  return pct === null || pct === undefined ? '—' : `±${pct} %`;
}

export function yearsText(from: number | null, to: number | null): string {
  if (from === null && to === null) return '—';
  if (from !== null && to !== null) return from === to ? String(from) : `${from}–${to}`;
  return from !== null ? `from ${from}` : `until ${to}`;
}

/** A test point's two ends, in the document's words. */
export function testPointEnds(tp: TestPoint, doc: TemplateDocument): string {
  switch (tp.kind) {
    case 'component-check': {
      const c = doc.components.find((x) => x.key === tp.componentKey);
      return c ? `${c.ref}: ${c.nodes[0]} to ${c.nodes[1]}` : tp.componentKey;
    }
    case 'chart-reading':
      return `${tp.from} to ${tp.to}`;
    case 'pair-relation':
      return `${testPointName(tp.a, doc)} with ${testPointName(tp.b, doc)}`;
  }
}

/** Short name of a test point by key (the component it checks, or its two nodes). */
export function testPointName(key: string, doc: TemplateDocument): string {
  const tp = doc.testPoints.find((t) => t.key === key);
  if (!tp) return key;
  if (tp.kind === 'component-check') return `check of ${doc.components.find((c) => c.key === tp.componentKey)?.ref ?? tp.componentKey}`;
  if (tp.kind === 'chart-reading') return `${tp.from} to ${tp.to}`;
  return `pair ${tp.a}/${tp.b}`;
}

export function expectedText(tp: TestPoint, doc: TemplateDocument): string {
  switch (tp.kind) {
    case 'component-check': {
      const c = doc.components.find((x) => x.key === tp.componentKey);
      return c ? nominalText(c.nominal) : '—';
    }
    case 'chart-reading':
      return nominalText(tp.expected);
    case 'pair-relation':
      return 'ratio 1 : 1';
  }
}

export function testPointTolerance(tp: TestPoint, doc: TemplateDocument): string {
  switch (tp.kind) {
    case 'component-check': {
      const c = doc.components.find((x) => x.key === tp.componentKey);
      if (c?.critical) return `${c.critical.lowPct} % / +${c.critical.highPct} % (critical)`;
      return toleranceText(c?.tolerancePct);
    }
    case 'chart-reading':
      return toleranceText(tp.tolerancePct);
    case 'pair-relation':
      return `ratio ${toleranceText(tp.ratioTolerancePct)}`;
  }
}

/** The conditions of a test point that differ from, or complete, the template's. */
export function conditionsText(c: TestConditions | undefined, doc: TemplateDocument): string {
  const all = { ...doc.conditions, ...(c ?? {}) };
  const parts = [all.tubesIn ? 'tubes in' : 'tubes out', all.speakerConnected ? 'speaker connected' : 'speaker disconnected'];
  if (all.controls) parts.push(all.controls);
  return parts.join('; ');
}

export function capacitorsOf(doc: TemplateDocument): Component[] {
  return doc.components.filter((c) => c.capacitor !== null);
}

/** Fields of a diff entry as `old → new` lines. */
export function fieldChange(before: unknown, after: unknown): string {
  return `${valueText(before)} → ${valueText(after)}`;
}

export function valueText(v: unknown): string {
  if (v === undefined) return '(none)';
  if (v === null) return '—';
  if (typeof v === 'object' && v !== null && ('ohms' in v || 'state' in v)) return nominalText(v as Nominal);
  if (Array.isArray(v)) return v.map(valueText).join(', ');
  if (typeof v === 'object') return JSON.stringify(v);
  return String(v);
}

/** The tube types a document's sockets name, upper-case, each once. */
export function tubeTypesOf(doc: TemplateDocument): string[] {
  return [...new Set(doc.stages.flatMap((s) => s.sockets.map((so) => so.tubeType.toUpperCase())))].sort();
}
