import { Injectable, computed, signal } from '@angular/core';
import { checkCapacitors, type CapacitorFinding } from '@domain/capacitor-checks';
import { assembleNetwork, chartDisagreements, expectedReading, type ChartDisagreement, type ExpectedReading } from '@domain/chassis-network';
import {
  hotChassisFor,
  parseNodeName,
  type ChartReading,
  type ChassisInfo,
  type Component,
  type Junction,
  type PairRelation,
  type Socket,
  type Stage,
  type TemplateConditions,
  type TemplateDocument,
  type TemplateProblem,
  type TestPoint,
  type TubeTypeRecord,
} from '@domain/template-format';
import { newKey, nextDesignation, splitDesignation } from './editor-keys';
import { nodeOptions, type NodeOption } from './node-options';
import type { PastedPart } from './parts-paste';
import { fieldMatches, placeProblems, type PlacedProblem, type ProblemTarget } from './problem-paths';

/** What the right-hand pane shows. */
export type Selection =
  | { kind: 'chassis' }
  | { kind: 'stage'; stageKey: string }
  | { kind: 'socket'; stageKey: string; socketKey: string }
  | { kind: 'capacitors' }
  | { kind: 'network' };

/** The draft as the API gives it (GET and PUT /api/templates/:id/draft). */
export interface DraftView {
  templateId: number;
  exists: boolean;
  revision: number;
  basedOn: number | null;
  content: TemplateDocument;
  /** Shown after a save when the API sends them. */
  warnings?: (TemplateProblem | string)[];
}

/** A 409 stale revision: the revision this page loaded and the one the server has now. */
export interface StaleConflict {
  yourRevision: number;
  currentRevision: number;
  message: string;
}

/** The part of an API error the store reads (api/http/errors.ts body). */
export interface SaveError {
  status: number;
  code: string;
  message: string;
  details?: Record<string, unknown> | null;
}

type NewComponent = Partial<Omit<Component, 'key' | 'stageKey'>>;
type TestPointInit =
  | { kind: 'component-check'; componentKey: string }
  | { kind: 'chart-reading'; from?: string; to?: string }
  | { kind: 'pair-relation'; a?: string; b?: string };

const clone = <T>(x: T): T => structuredClone(x);

/**
 * The editor's state in one place: the document, the selection, the dirty flag, the revision,
 * the problems (the server's, placed by key, and the network's, computed in the browser) and the
 * announcement for screen readers. A plain signal class: no HTTP here (the page talks to the API
 * through DraftApi and hands the answers over), so it is tested without TestBed.
 */
@Injectable()
export class EditorStore {
  readonly templateId = signal<number | null>(null);
  readonly doc = signal<TemplateDocument | null>(null);
  readonly revision = signal(0);
  /** The published version a new draft starts from (null when the draft exists). */
  readonly basedOn = signal<number | null>(null);
  readonly dirty = signal(false);
  readonly selection = signal<Selection>({ kind: 'chassis' });
  /** The component or test point opened in the form below the tables. */
  readonly editing = signal<{ kind: 'component' | 'test-point'; key: string } | null>(null);
  readonly tubeTypes = signal<ReadonlyMap<string, TubeTypeRecord>>(new Map());
  readonly saving = signal(false);
  readonly serverProblems = signal<PlacedProblem[]>([]);
  readonly saveMessage = signal<string | null>(null);
  /** Warnings shown after a save (the API's, or the network's and capacitor list's own). */
  readonly savedWarnings = signal<string[]>([]);
  readonly conflict = signal<StaleConflict | null>(null);
  /** Polite aria-live text (reordering, bulk actions). */
  readonly announcement = signal('');
  /** Bumped on every change, so a save knows whether the page changed while it ran. */
  private readonly changeCount = signal(0);

  // -------------------------------------------------------------------------------------------
  // Derived: the chassis network, computed in the browser (api/domain/chassis-network.ts)

  readonly network = computed(() => {
    const doc = this.doc();
    return doc === null ? null : assembleNetwork(doc, this.tubeTypes());
  });

  readonly networkProblems = computed<PlacedProblem[]>(() => {
    const doc = this.doc();
    const net = this.network();
    return doc === null || net === null ? [] : placeProblems(net.problems.filter((p) => !p.path.startsWith('tubeTypes')), doc, 'network');
  });

  readonly disagreements = computed<ReadonlyMap<string, ChartDisagreement>>(() => {
    const doc = this.doc();
    if (doc === null) return new Map();
    return new Map(chartDisagreements(doc, this.tubeTypes()).map((d) => [d.testPointKey, d]));
  });

  readonly capacitorFindings = computed<CapacitorFinding[]>(() => {
    const doc = this.doc();
    return doc === null ? [] : checkCapacitors(doc, this.tubeTypes());
  });

  readonly nodeOptions = computed<NodeOption[]>(() => {
    const doc = this.doc();
    return doc === null ? [] : nodeOptions(doc, this.tubeTypes());
  });

  /** Every problem to list: the server's first, then the network's and the capacitor list's. */
  readonly allProblems = computed<PlacedProblem[]>(() => {
    const doc = this.doc();
    const caps = doc === null ? [] : placeProblems(this.capacitorFindings(), doc, 'capacitors');
    return [...this.serverProblems(), ...this.networkProblems(), ...caps];
  });

  readonly selectedStage = computed<Stage | null>(() => {
    const sel = this.selection();
    const doc = this.doc();
    if (doc === null || (sel.kind !== 'stage' && sel.kind !== 'socket')) return null;
    return doc.stages.find((s) => s.key === sel.stageKey) ?? null;
  });

  readonly selectedSocket = computed<Socket | null>(() => {
    const sel = this.selection();
    if (sel.kind !== 'socket') return null;
    return this.selectedStage()?.sockets.find((s) => s.key === sel.socketKey) ?? null;
  });

  /** The expected in-circuit readings of the selected stage's test points. */
  readonly stageReadings = computed<ReadonlyMap<string, ExpectedReading>>(() => {
    const doc = this.doc();
    const stage = this.selectedStage();
    if (doc === null || stage === null) return new Map();
    const tt = this.tubeTypes();
    return new Map(doc.testPoints.filter((tp) => tp.stageKey === stage.key).map((tp) => [tp.key, expectedReading(doc, tt, tp)]));
  });

  // -------------------------------------------------------------------------------------------
  // Loading and saving

  load(templateId: number, draft: DraftView): void {
    this.templateId.set(templateId);
    this.doc.set(clone(draft.content));
    this.revision.set(draft.revision);
    this.basedOn.set(draft.basedOn);
    this.dirty.set(false);
    this.serverProblems.set([]);
    this.conflict.set(null);
    this.savedWarnings.set([]);
    this.saveMessage.set(null);
    const sel = this.selection();
    if (sel.kind === 'stage' || sel.kind === 'socket') {
      if (!draft.content.stages.some((s) => s.key === sel.stageKey)) this.selection.set({ kind: 'chassis' });
    }
  }

  /** Unsaved work put back (kept in the browser): dirty, on top of the revision it was based on. */
  restore(doc: TemplateDocument, revision: number): void {
    this.doc.set(clone(doc));
    this.revision.set(revision);
    this.markChanged();
  }

  setTubeTypes(list: readonly TubeTypeRecord[]): void {
    this.tubeTypes.set(new Map(list.map((t) => [t.designation, t])));
  }

  /** What to PUT, and the change count it reflects. */
  beginSave(): { revision: number; content: TemplateDocument; change: number } | null {
    const doc = this.doc();
    if (doc === null || this.saving()) return null;
    this.saving.set(true);
    this.saveMessage.set(null);
    return { revision: this.revision(), content: clone(doc), change: this.changeCount() };
  }

  /** The save went through: the new revision; clean unless the page changed while it ran. */
  saved(answer: DraftView, change: number): void {
    this.saving.set(false);
    this.revision.set(answer.revision);
    this.basedOn.set(answer.basedOn);
    this.serverProblems.set([]);
    this.conflict.set(null);
    if (change === this.changeCount()) this.dirty.set(false);
    const fromApi = (answer.warnings ?? []).map((w) => (typeof w === 'string' ? w : w.message));
    // The API's warnings when it sends them; else the browser's own (network, capacitor list).
    const local = fromApi.length ? [] : [...this.networkProblems(), ...placeProblemsOrEmpty(this)].filter((p) => p.severity === 'warning').map((p) => p.message);
    this.savedWarnings.set([...fromApi, ...local]);
    this.saveMessage.set(`Saved as revision ${answer.revision}.`);
    this.announce(`Saved as revision ${answer.revision}${this.savedWarnings().length ? `, ${this.savedWarnings().length} warnings` : ''}.`);
  }

  /** The save was refused: 400 problems placed at their fields, 409 stale kept with both revisions. */
  saveFailed(error: SaveError, sent: TemplateDocument): void {
    this.saving.set(false);
    const details = error.details ?? {};
    if (error.status === 400 && Array.isArray(details['problems'])) {
      const problems = (details['problems'] as TemplateProblem[]).filter((p) => typeof p?.path === 'string');
      this.serverProblems.set(placeProblems(problems, sent, 'server'));
      this.saveMessage.set(`Not saved: ${problems.length === 1 ? 'one problem' : `${problems.length} problems`} to fix (listed below and at their fields).`);
    } else if (error.status === 409 && error.code === 'stale-revision') {
      const yours = Number(details['yourRevision'] ?? this.revision());
      const current = Number(details['currentRevision'] ?? NaN);
      this.conflict.set({ yourRevision: yours, currentRevision: current, message: error.message });
      this.saveMessage.set(`Not saved: the draft is at revision ${current} on the server, this page has revision ${yours}.`);
    } else {
      this.saveMessage.set(`Not saved: ${error.message}`);
    }
    this.announce(this.saveMessage() ?? 'Not saved.');
  }

  /** Problems placed on one item's field (`field` '' = the item itself). */
  problemsAt(target: ItemRef, field: string): PlacedProblem[] {
    return this.allProblems().filter((p) => sameItem(p.target, target) && fieldMatches(p.target.field, field));
  }

  /** Every problem on one item (any field). */
  problemsOn(kind: ProblemTarget['kind'], key: string): PlacedProblem[] {
    return this.allProblems().filter((p) => p.target.kind === kind && 'key' in p.target && p.target.key === key);
  }

  // -------------------------------------------------------------------------------------------
  // Edits

  private mutate(fn: (doc: TemplateDocument) => void): void {
    const doc = this.doc();
    if (doc === null) return;
    const next = clone(doc);
    fn(next);
    this.doc.set(next);
    this.markChanged();
  }

  private markChanged(): void {
    this.dirty.set(true);
    this.changeCount.update((n) => n + 1);
  }

  announce(text: string): void {
    // A repeated text is announced again: it differs by a trailing no-break space.
    this.announcement.set(this.announcement() === text ? `${text}\u00a0` : text);
  }

  select(sel: Selection): void {
    this.selection.set(sel);
    this.editing.set(null);
  }

  updateChassis(patch: Partial<ChassisInfo>): void {
    this.mutate((d) => {
      const before = d.chassis;
      const next = { ...before, ...patch };
      // Hot chassis follows the power arrangement unless the author set it explicitly (it differed).
      if (patch.power !== undefined && patch.hotChassis === undefined && before.hotChassis === hotChassisFor(before.power)) next.hotChassis = hotChassisFor(patch.power);
      d.chassis = next;
    });
  }

  updateConditions(patch: Partial<TemplateConditions>): void {
    this.mutate((d) => (d.conditions = { ...d.conditions, ...patch }));
  }

  // Stages

  addStage(name = 'New stage'): string {
    const key = newKey('st', this.keys());
    this.mutate((d) => d.stages.push({ key, name, sockets: [] }));
    this.select({ kind: 'stage', stageKey: key });
    return key;
  }

  updateStage(key: string, patch: Partial<Pick<Stage, 'name'>>): void {
    this.mutate((d) => {
      const s = d.stages.find((x) => x.key === key);
      if (s) Object.assign(s, patch);
    });
  }

  /** Removes a stage with its sockets, components and test points (and the checks that name them). */
  removeStage(key: string): void {
    this.mutate((d) => {
      d.stages = d.stages.filter((s) => s.key !== key);
      const gone = new Set(d.components.filter((c) => c.stageKey === key).map((c) => c.key));
      d.components = d.components.filter((c) => c.stageKey !== key);
      d.testPoints = d.testPoints.filter((tp) => tp.stageKey !== key);
      dropDangling(d, gone);
    });
    this.select({ kind: 'chassis' });
  }

  moveStage(key: string, delta: number): void {
    const doc = this.doc();
    if (doc === null) return;
    const from = doc.stages.findIndex((s) => s.key === key);
    const to = from + delta;
    if (from < 0 || to < 0 || to >= doc.stages.length) return;
    this.mutate((d) => d.stages.splice(to, 0, ...d.stages.splice(from, 1)));
    this.announce(`Stage ${doc.stages[from].name} moved to position ${to + 1} of ${doc.stages.length}.`);
  }

  /**
   * A copy of a stage: new keys everywhere, sockets renumbered to the next free designators, the
   * components' and chart readings' pin nodes moved to the new designators, component refs
   * renumbered to the next free numbers, test points copied in their bench order after the stage's.
   */
  duplicateStage(key: string): string | null {
    const doc = this.doc();
    const stage = doc?.stages.find((s) => s.key === key);
    if (doc == null || stage === undefined) return null;
    const taken = this.keys();
    const stageKey = newKey('st', taken);
    taken.add(stageKey);
    const designators = new Set(doc.stages.flatMap((s) => s.sockets.map((so) => so.designator)));
    const rename = new Map<string, string>();
    const sockets = stage.sockets.map((so) => {
      const d = nextDesignation(so.designator, designators);
      designators.add(d);
      rename.set(so.designator, d);
      const k = newKey('so', taken);
      taken.add(k);
      return { ...so, key: k, designator: d };
    });
    const copy = this.copyParts(
      doc,
      doc.components.filter((c) => c.stageKey === key),
      doc.testPoints.filter((tp) => tp.stageKey === key),
      rename,
      stageKey,
      taken,
    );
    this.mutate((d) => {
      const at = d.stages.findIndex((s) => s.key === key);
      d.stages.splice(at + 1, 0, { key: stageKey, name: `${stage.name} (copy)`, sockets });
      d.components.push(...copy.components);
      d.testPoints.push(...copy.testPoints);
    });
    this.select({ kind: 'stage', stageKey });
    this.announce(`Stage ${stage.name} duplicated: ${sockets.length} sockets, ${copy.components.length} components, ${copy.testPoints.length} test points.`);
    return stageKey;
  }

  // Sockets

  addSocket(stageKey: string, tubeType = ''): string {
    const doc = this.doc();
    const key = newKey('so', this.keys());
    const designator = nextDesignation('V1', doc?.stages.flatMap((s) => s.sockets.map((so) => so.designator)) ?? []);
    this.mutate((d) => d.stages.find((s) => s.key === stageKey)?.sockets.push({ key, designator, tubeType }));
    this.select({ kind: 'socket', stageKey, socketKey: key });
    return key;
  }

  /** A socket's designator or tube type. A new designator is carried into the nodes that name the old one. */
  updateSocket(stageKey: string, key: string, patch: Partial<Pick<Socket, 'designator' | 'tubeType'>>): void {
    this.mutate((d) => {
      const so = d.stages.find((s) => s.key === stageKey)?.sockets.find((x) => x.key === key);
      if (!so) return;
      if (patch.designator !== undefined && patch.designator !== so.designator && /^[A-Za-z]+[0-9]+[A-Za-z]?$/.test(patch.designator)) {
        const map = new Map([[so.designator, patch.designator]]);
        for (const c of d.components) {
          c.nodes = c.nodes.map((n) => renameNode(n, map)) as [string, string];
          if (c.wiper) c.wiper.node = renameNode(c.wiper.node, map);
          if (c.capacitor?.can) c.capacitor.can.commonReturn = renameNode(c.capacitor.can.commonReturn, map);
        }
        for (const tp of d.testPoints) if (tp.kind === 'chart-reading') [tp.from, tp.to] = [renameNode(tp.from, map), renameNode(tp.to, map)];
      }
      Object.assign(so, patch);
    });
  }

  removeSocket(stageKey: string, key: string): void {
    this.mutate((d) => {
      const st = d.stages.find((s) => s.key === stageKey);
      if (st) st.sockets = st.sockets.filter((x) => x.key !== key);
    });
    this.select({ kind: 'stage', stageKey });
  }

  /**
   * A copy of a socket in the same stage under the next free designator (V6 after V5), with the
   * stage's components that touch only that socket's pins and the fixed nodes (a cathode
   * resistor, a grid leak to chassis), their component checks and the chart readings on its pins.
   */
  duplicateSocket(stageKey: string, key: string): string | null {
    const doc = this.doc();
    const socket = doc?.stages.find((s) => s.key === stageKey)?.sockets.find((x) => x.key === key);
    if (doc == null || socket === undefined) return null;
    const taken = this.keys();
    const socketKey = newKey('so', taken);
    taken.add(socketKey);
    const designator = nextDesignation(socket.designator, doc.stages.flatMap((s) => s.sockets.map((so) => so.designator)));
    const rename = new Map([[socket.designator, designator]]);
    const onSocket = (n: string) => {
      const p = parseNodeName(n);
      return p.kind === 'pin' && p.designator === socket.designator;
    };
    const ownOrFixed = (n: string) => onSocket(n) || parseNodeName(n).kind === 'fixed';
    const parts = doc.components.filter((c) => c.stageKey === stageKey && c.nodes.some(onSocket) && c.nodes.every(ownOrFixed));
    const partKeys = new Set(parts.map((c) => c.key));
    const points = doc.testPoints.filter(
      (tp) =>
        tp.stageKey === stageKey &&
        ((tp.kind === 'component-check' && partKeys.has(tp.componentKey)) || (tp.kind === 'chart-reading' && [tp.from, tp.to].some(onSocket) && [tp.from, tp.to].every(ownOrFixed))),
    );
    const copy = this.copyParts(doc, parts, points, rename, stageKey, taken);
    this.mutate((d) => {
      const st = d.stages.find((s) => s.key === stageKey)!;
      st.sockets.splice(st.sockets.findIndex((x) => x.key === key) + 1, 0, { key: socketKey, designator, tubeType: socket.tubeType });
      d.components.push(...copy.components);
      d.testPoints.push(...copy.testPoints);
    });
    this.select({ kind: 'socket', stageKey, socketKey });
    this.announce(`Socket ${socket.designator} duplicated as ${designator} with ${copy.components.length} components and ${copy.testPoints.length} test points.`);
    return socketKey;
  }

  // Junctions

  addJunction(name: string, note = ''): void {
    this.mutate((d) => d.junctions.push({ name, note }));
  }

  updateJunction(index: number, patch: Partial<Junction>): void {
    this.mutate((d) => {
      if (d.junctions[index]) d.junctions[index] = { ...d.junctions[index], ...patch };
    });
  }

  removeJunction(index: number): void {
    this.mutate((d) => d.junctions.splice(index, 1));
  }

  // Components

  addComponent(stageKey: string, init: NewComponent = {}): string {
    const doc = this.doc();
    const key = newKey('c', this.keys());
    const ref = init.ref ?? nextDesignation('R1', doc?.components.map((c) => c.ref) ?? []);
    const c: Component = {
      key,
      ref,
      kind: 'carbon-composition',
      stageKey,
      nodes: ['', ''],
      wiper: null,
      nominal: { state: 'open' },
      tolerancePct: 20,
      ratedWatts: null,
      ratedVolts: null,
      voltsAcross: null,
      critical: null,
      fuseRole: false,
      mainsSide: false,
      nonLinear: false,
      valueSource: 'service-data',
      capacitor: null,
      note: '',
      ...init,
    };
    this.mutate((d) => d.components.push(c));
    this.editing.set({ kind: 'component', key });
    return key;
  }

  updateComponent(key: string, patch: Partial<Omit<Component, 'key'>>): void {
    this.mutate((d) => {
      const i = d.components.findIndex((c) => c.key === key);
      if (i >= 0) d.components[i] = { ...d.components[i], ...patch };
    });
  }

  /** Removes a component with its component checks (and pair relations naming those). */
  removeComponent(key: string): void {
    this.mutate((d) => {
      d.components = d.components.filter((c) => c.key !== key);
      dropDangling(d, new Set([key]));
    });
    if (this.editing()?.key === key) this.editing.set(null);
  }

  /** Adds the parts of a previewed paste to a stage, and the junctions they name. */
  applyPaste(stageKey: string, parts: readonly PastedPart[], newJunctions: readonly string[]): void {
    const taken = this.keys();
    this.mutate((d) => {
      for (const name of newJunctions) if (!d.junctions.some((j) => j.name === name)) d.junctions.push({ name, note: 'added from a pasted parts list' });
      for (const p of parts) {
        const key = newKey('c', taken);
        taken.add(key);
        d.components.push({ ...clone(p), key, stageKey });
      }
    });
    this.announce(`${parts.length} components added${newJunctions.length ? ` and ${newJunctions.length} junctions declared` : ''}.`);
  }

  /**
   * One component check for every component that has none yet, in its own stage, appended to
   * the bench order. Wires (0-Ω links) are not parts to check. Returns how many were made and skipped.
   */
  createComponentChecks(): { created: number; skipped: number } {
    const doc = this.doc();
    if (doc === null) return { created: 0, skipped: 0 };
    const checked = new Set(doc.testPoints.flatMap((tp) => (tp.kind === 'component-check' ? [tp.componentKey] : [])));
    const todo = doc.components.filter((c) => c.kind !== 'wire' && !checked.has(c.key));
    const skipped = doc.components.length - todo.length;
    if (todo.length > 0) {
      const taken = this.keys();
      this.mutate((d) => {
        for (const c of todo) {
          const key = newKey('tp', taken);
          taken.add(key);
          d.testPoints.push({ key, stageKey: c.stageKey, kind: 'component-check', componentKey: c.key });
        }
      });
    }
    this.announce(`${todo.length} component checks created; ${skipped} components skipped (already checked, or wires).`);
    return { created: todo.length, skipped };
  }

  // Test points (list order = bench order)

  addTestPoint(stageKey: string, init: TestPointInit): string {
    const key = newKey('tp', this.keys());
    let tp: TestPoint;
    if (init.kind === 'component-check') tp = { key, stageKey, kind: 'component-check', componentKey: init.componentKey };
    else if (init.kind === 'chart-reading') {
      const chart: ChartReading = { key, stageKey, kind: 'chart-reading', from: init.from ?? '', to: init.to ?? 'chassis', expected: { state: 'open' }, tolerancePct: 20, conditions: {}, valueSource: 'service-data' };
      tp = chart;
    } else {
      const pair: PairRelation = { key, stageKey, kind: 'pair-relation', a: init.a ?? '', b: init.b ?? '', ratioTolerancePct: 5 };
      tp = pair;
    }
    this.mutate((d) => d.testPoints.push(tp));
    this.editing.set({ kind: 'test-point', key });
    return key;
  }

  updateTestPoint(key: string, patch: Partial<ChartReading> | Partial<PairRelation> | Partial<{ componentKey: string }>): void {
    this.mutate((d) => {
      const i = d.testPoints.findIndex((t) => t.key === key);
      if (i >= 0) d.testPoints[i] = { ...d.testPoints[i], ...patch, key, kind: d.testPoints[i].kind } as TestPoint;
    });
  }

  removeTestPoint(key: string): void {
    this.mutate((d) => {
      d.testPoints = d.testPoints.filter((t) => t.key !== key && !(t.kind === 'pair-relation' && (t.a === key || t.b === key)));
    });
    if (this.editing()?.key === key) this.editing.set(null);
  }

  /** A stage's test points in bench order. */
  stagePoints(stageKey: string): TestPoint[] {
    return this.doc()?.testPoints.filter((tp) => tp.stageKey === stageKey) ?? [];
  }

  /**
   * Moves a test point within its stage's bench order (indices in the stage's list, as the drop
   * list has them); the stage's points keep the slots they hold in the whole list.
   */
  moveTestPoint(stageKey: string, from: number, to: number): void {
    const doc = this.doc();
    if (doc === null || from === to) return;
    const slots = doc.testPoints.flatMap((tp, i) => (tp.stageKey === stageKey ? [i] : []));
    if (from < 0 || to < 0 || from >= slots.length || to >= slots.length) return;
    this.mutate((d) => {
      const points = slots.map((i) => d.testPoints[i]);
      points.splice(to, 0, ...points.splice(from, 1));
      slots.forEach((slot, k) => (d.testPoints[slot] = points[k]));
    });
  }

  /** Keyboard reorder (Alt+↑/↓): one step within the stage, announced. Returns the new index or null. */
  moveTestPointBy(key: string, delta: -1 | 1): number | null {
    const doc = this.doc();
    const tp = doc?.testPoints.find((t) => t.key === key);
    if (doc == null || tp === undefined) return null;
    const list = this.stagePoints(tp.stageKey);
    const from = list.findIndex((t) => t.key === key);
    const to = from + delta;
    if (to < 0 || to >= list.length) {
      this.announce(`${this.pointName(tp)} is already ${delta < 0 ? 'first' : 'last'}.`);
      return null;
    }
    this.moveTestPoint(tp.stageKey, from, to);
    this.announce(`${this.pointName(tp)} moved to position ${to + 1} of ${list.length}.`);
    return to;
  }

  /** A test point in words: `R12 check`, `V3.7 to chassis`, `pair R20 / R21`. */
  pointName(tp: TestPoint): string {
    const doc = this.doc();
    if (tp.kind === 'component-check') return `${doc?.components.find((c) => c.key === tp.componentKey)?.ref ?? '?'} check`;
    if (tp.kind === 'chart-reading') return `${tp.from || '?'} to ${tp.to || '?'}`;
    const name = (k: string) => {
      const o = doc?.testPoints.find((t) => t.key === k);
      return o === undefined || o.kind === 'pair-relation' ? '?' : this.pointName(o);
    };
    return `pair ${name(tp.a)} / ${name(tp.b)}`;
  }

  // -------------------------------------------------------------------------------------------

  private keys(): Set<string> {
    const d = this.doc();
    if (d === null) return new Set();
    return new Set([...d.stages.flatMap((s) => [s.key, ...s.sockets.map((so) => so.key)]), ...d.components.map((c) => c.key), ...d.testPoints.map((t) => t.key)]);
  }

  /** Copies of components and test points with new keys, pins renamed, refs renumbered. */
  private copyParts(doc: TemplateDocument, parts: Component[], points: TestPoint[], rename: Map<string, string>, stageKey: string, taken: Set<string>) {
    const refs = new Set(doc.components.map((c) => c.ref));
    const compKeys = new Map<string, string>();
    const components = parts.map((c) => {
      const key = newKey('c', taken);
      taken.add(key);
      compKeys.set(c.key, key);
      const ref = splitDesignation(c.ref) === null ? `${c.ref}-2` : nextDesignation(c.ref, refs);
      refs.add(ref);
      const copy = clone(c);
      copy.key = key;
      copy.ref = ref;
      copy.stageKey = stageKey;
      copy.nodes = copy.nodes.map((n) => renameNode(n, rename)) as [string, string];
      if (copy.wiper) copy.wiper.node = renameNode(copy.wiper.node, rename);
      return copy;
    });
    const pointKeys = new Map<string, string>();
    for (const tp of points) {
      const key = newKey('tp', taken);
      taken.add(key);
      pointKeys.set(tp.key, key);
    }
    const testPoints: TestPoint[] = [];
    for (const tp of points) {
      const key = pointKeys.get(tp.key)!;
      if (tp.kind === 'component-check') {
        const ck = compKeys.get(tp.componentKey);
        if (ck !== undefined) testPoints.push({ ...tp, key, stageKey, componentKey: ck });
      } else if (tp.kind === 'chart-reading') {
        testPoints.push({ ...clone(tp), key, stageKey, from: renameNode(tp.from, rename), to: renameNode(tp.to, rename) });
      } else if (pointKeys.has(tp.a) && pointKeys.has(tp.b)) {
        testPoints.push({ ...tp, key, stageKey, a: pointKeys.get(tp.a)!, b: pointKeys.get(tp.b)! });
      }
    }
    return { components, testPoints };
  }
}

function placeProblemsOrEmpty(store: EditorStore): PlacedProblem[] {
  const doc = store.doc();
  return doc === null ? [] : placeProblems(store.capacitorFindings(), doc, 'capacitors');
}

/** An item of the document, as a problem target names it (key for keyed items, index for junctions). */
export interface ItemRef {
  kind: ProblemTarget['kind'];
  key?: string;
  index?: number;
}

function sameItem(a: ProblemTarget, b: ItemRef): boolean {
  if (a.kind !== b.kind) return false;
  if ('key' in a) return a.key === b.key;
  if (a.kind === 'junction') return a.index === b.index;
  return true;
}

/** `V3.7` with V3 → V8 becomes `V8.7`; other names stay. */
export function renameNode(name: string, map: ReadonlyMap<string, string>): string {
  const p = parseNodeName(name);
  if (p.kind !== 'pin') return name;
  const to = map.get(p.designator);
  return to === undefined ? name : `${to}.${p.pin}`;
}

/** Drops component checks of removed components, and pair relations left naming a missing point. */
function dropDangling(d: TemplateDocument, goneComponents: ReadonlySet<string>): void {
  d.testPoints = d.testPoints.filter((tp) => !(tp.kind === 'component-check' && goneComponents.has(tp.componentKey)));
  const keys = new Set(d.testPoints.map((t) => t.key));
  d.testPoints = d.testPoints.filter((tp) => tp.kind !== 'pair-relation' || (keys.has(tp.a) && keys.has(tp.b)));
}
