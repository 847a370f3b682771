import { CdkDrag, CdkDragDrop, CdkDragHandle, CdkDropList } from '@angular/cdk/drag-drop';
import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, signal, viewChildren } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import type { Component as Part, TestPoint } from '@domain/template-format';
import { ComponentForm } from '../component-form/component-form';
import { EditorStore } from '../editor-store';
import { inCircuitText, loweredText, parallelRefs } from '../expected-words';
import { showValue } from '../nominal-entry';
import { PastePanel } from '../paste-panel/paste-panel';
import { TestPointForm } from '../test-point-form/test-point-form';
import { TemplateFiles } from '../../files/template-files';

const KIND_SHORT: Readonly<Record<string, string>> = {
  'carbon-composition': 'carbon comp.',
  'carbon-film': 'carbon film',
  'metal-film': 'metal film',
};

/** One stage: its sockets, components and test points (bench order), with the network's expectations. */
@Component({
  selector: 'dm-stage-panel',
  imports: [CdkDropList, CdkDrag, CdkDragHandle, MatButtonModule, MatIconModule, MatMenuModule, ComponentForm, TestPointForm, PastePanel, TemplateFiles],
  templateUrl: './stage-panel.html',
  styleUrls: ['../editor-forms.scss', './stage-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StagePanel {
  protected readonly store = inject(EditorStore);
  protected readonly stage = computed(() => this.store.selectedStage()!);
  protected readonly components = computed(() => this.store.doc()!.components.filter((c) => c.stageKey === this.stage().key));
  protected readonly points = computed(() => this.store.doc()!.testPoints.filter((t) => t.stageKey === this.stage().key));
  protected readonly pasting = signal(false);
  protected readonly bulkMessage = signal<string | null>(null);
  /** The stage's files load when the author opens them (the panel stays quiet otherwise). */
  protected readonly filesOpen = signal(false);
  protected readonly stageChoices = computed(() => this.store.doc()!.stages.map((s) => ({ key: s.key, name: s.name })));
  private readonly rows = viewChildren<ElementRef<HTMLElement>>('pointRow');

  protected kindWord(kind: string): string {
    return KIND_SHORT[kind] ?? kind;
  }

  protected nominal(c: Part): string {
    if (c.kind === 'capacitor' && c.capacitor) return `${c.capacitor.uF} µF ${c.capacitor.workingVolts} V`;
    return showValue(c.nominal);
  }

  protected rating(c: Part): string {
    const parts: string[] = [];
    if (c.ratedWatts !== null) parts.push(`${c.ratedWatts} W`);
    if (c.ratedVolts !== null) parts.push(`${c.ratedVolts} V`);
    return parts.join(' · ') || '—';
  }

  protected componentErrors(c: Part): number {
    return this.store.problemsOn('component', c.key).filter((p) => p.severity === 'error').length;
  }

  protected pointErrors(tp: TestPoint): string[] {
    return this.store.problemsOn('test-point', tp.key).map((p) => p.message);
  }

  protected printed(tp: TestPoint): string {
    const r = this.store.stageReadings().get(tp.key);
    if (tp.kind === 'pair-relation') return `ratio ±${tp.ratioTolerancePct} %`;
    if (tp.kind === 'chart-reading') return `${showValue(tp.expected)} ±${tp.tolerancePct} %`;
    const c = this.store.doc()!.components.find((x) => x.key === tp.componentKey);
    if (c === undefined) return '—';
    return `${showValue(r?.printed ?? null)}${c.tolerancePct !== null ? ` ±${c.tolerancePct} %` : ''}`;
  }

  protected inCircuit(tp: TestPoint): string {
    return inCircuitText(this.store.stageReadings().get(tp.key));
  }

  protected lowered(tp: TestPoint): string {
    return loweredText(this.store.stageReadings().get(tp.key));
  }

  protected parallel(tp: TestPoint): string[] {
    return parallelRefs(this.store.stageReadings().get(tp.key), this.store.doc()!);
  }

  protected disagreement(tp: TestPoint) {
    return this.store.disagreements().get(tp.key) ?? null;
  }

  protected kindOf(tp: TestPoint): string {
    return tp.kind === 'component-check' ? 'component check' : tp.kind === 'chart-reading' ? 'chart reading' : 'pair relation';
  }


  protected rename(event: Event): void {
    const name = (event.target as HTMLInputElement).value.trim();
    if (name !== '') this.store.updateStage(this.stage().key, { name });
  }

  protected removeStage(): void {
    const st = this.stage();
    const n = this.components().length + this.points().length;
    if (n === 0 || confirm(`Remove the stage ${st.name} with its ${st.sockets.length} sockets, ${this.components().length} components and ${this.points().length} test points?`)) this.store.removeStage(st.key);
  }

  protected removeComponent(c: Part): void {
    if (confirm(`Remove ${c.ref} and its component checks?`)) this.store.removeComponent(c.key);
  }

  protected checksForAll(): void {
    const r = this.store.createComponentChecks();
    this.bulkMessage.set(`${r.created} component checks created; ${r.skipped} components skipped (already checked, or wires).`);
  }

  protected drop(event: CdkDragDrop<TestPoint[]>): void {
    this.store.moveTestPoint(this.stage().key, event.previousIndex, event.currentIndex);
    const tp = this.points()[event.currentIndex];
    if (tp) this.store.announce(`${this.store.pointName(tp)} moved to position ${event.currentIndex + 1} of ${this.points().length}.`);
  }

  /** Alt+↑ / Alt+↓ on a focused row moves it; focus stays on the moved row. */
  protected rowKey(event: KeyboardEvent, tp: TestPoint): void {
    if (!event.altKey || (event.key !== 'ArrowUp' && event.key !== 'ArrowDown')) return;
    event.preventDefault();
    this.move(tp, event.key === 'ArrowUp' ? -1 : 1);
  }

  protected move(tp: TestPoint, delta: -1 | 1): void {
    const to = this.store.moveTestPointBy(tp.key, delta);
    if (to === null) return;
    queueMicrotask(() => setTimeout(() => this.rows().find((r) => r.nativeElement.dataset['key'] === tp.key)?.nativeElement.focus()));
  }

  protected addCheck(c: Part): void {
    this.store.addTestPoint(this.stage().key, { kind: 'component-check', componentKey: c.key });
  }

  protected unchecked = computed(() => {
    const checked = new Set(this.store.doc()!.testPoints.flatMap((t) => (t.kind === 'component-check' ? [t.componentKey] : [])));
    return this.components().filter((c) => !checked.has(c.key));
  });

  protected editingComponent = computed(() => {
    const e = this.store.editing();
    return e?.kind === 'component' && this.components().some((c) => c.key === e.key) ? e.key : null;
  });

  protected editingPoint = computed(() => {
    const e = this.store.editing();
    return e?.kind === 'test-point' && this.points().some((t) => t.key === e.key) ? e.key : null;
  });
}
