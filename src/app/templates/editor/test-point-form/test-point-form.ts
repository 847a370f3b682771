import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { ChartReading, Expected, TestConditions, TestPoint } from '@domain/template-format';
import { VALUE_SOURCES, type ValueSource } from '@domain/words';
import { VALUE_SOURCE_WORDS } from '../component-form/component-form';
import { EditorStore } from '../editor-store';
import { filterNodes } from '../node-options';
import { readNominal, showValue } from '../nominal-entry';

/** An expected chart value as typed: a value or open/short (no text kept: the chart prints it). */
export function readExpected(text: string): { ok: true; expected: Expected } | { ok: false; message: string } {
  const r = readNominal(text);
  if (!r.ok) return r;
  return { ok: true, expected: 'state' in r.nominal ? { state: r.nominal.state } : { ohms: r.nominal.ohms } };
}

type Tri = 'template' | 'yes' | 'no';

/**
 * One test point. Fields write through to the store on change; a value that does not read shows
 * its error beside the field and is not written.
 */
@Component({
  selector: 'dm-test-point-form',
  imports: [FormsModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatAutocompleteModule, MatButtonModule, MatIconModule],
  templateUrl: './test-point-form.html',
  styleUrls: ['../editor-forms.scss', '../component-form/component-form.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TestPointForm {
  readonly testPointKey = input.required<string>();
  protected readonly store = inject(EditorStore);
  protected readonly sources = VALUE_SOURCES;
  protected readonly sourceWords = VALUE_SOURCE_WORDS;
  protected readonly tp = computed<TestPoint | null>(() => this.store.doc()!.testPoints.find((t) => t.key === this.testPointKey()) ?? null);
  protected readonly stageComponents = computed(() => {
    const tp = this.tp();
    return this.store.doc()!.components.filter((c) => tp !== null && c.stageKey === tp.stageKey && c.kind !== 'wire');
  });
  /** Test points a pair relation may name: component checks and chart readings of the template. */
  protected readonly pairable = computed(() => this.store.doc()!.testPoints.filter((t) => t.kind !== 'pair-relation' && t.key !== this.testPointKey()));
  protected expectedText = '';
  protected expectedError: string | null = null;
  private shownFor: string | null = null;

  protected chart(): ChartReading | null {
    const tp = this.tp();
    if (tp?.kind !== 'chart-reading') return null;
    if (this.shownFor !== tp.key) {
      this.shownFor = tp.key;
      this.expectedText = showValue(tp.expected);
      this.expectedError = null;
    }
    return tp;
  }

  protected nodeChoices(text: string) {
    return filterNodes(this.store.nodeOptions(), text);
  }

  protected problem(field: string): string | null {
    return this.store.problemsAt({ kind: 'test-point', key: this.testPointKey() }, field)[0]?.message ?? null;
  }

  protected set(patch: Record<string, unknown>): void {
    this.store.updateTestPoint(this.testPointKey(), patch);
  }

  protected setNumber(field: 'tolerancePct' | 'ratioTolerancePct', text: string): void {
    const n = Number(text);
    if (text !== '' && n > 0 && n <= 100) this.set({ [field]: n });
  }

  protected setExpected(text: string): void {
    this.expectedText = text;
    const r = readExpected(text);
    this.expectedError = r.ok ? null : r.message;
    if (r.ok) this.set({ expected: r.expected });
  }

  protected tri(v: boolean | undefined): Tri {
    return v === undefined ? 'template' : v ? 'yes' : 'no';
  }

  protected setCondition(field: 'tubesIn' | 'speakerConnected', v: Tri): void {
    const tp = this.chart();
    if (tp === null) return;
    const conditions: TestConditions = { ...tp.conditions };
    if (v === 'template') delete conditions[field];
    else conditions[field] = v === 'yes';
    this.set({ conditions });
  }

  protected setControls(text: string): void {
    const tp = this.chart();
    if (tp === null) return;
    const conditions: TestConditions = { ...tp.conditions };
    if (text.trim() === '') delete conditions.controls;
    else conditions.controls = text;
    this.set({ conditions });
  }

  protected setSource(v: ValueSource): void {
    this.set({ valueSource: v });
  }

  protected pointLabel(t: TestPoint): string {
    return `${this.store.doc()!.testPoints.indexOf(t) + 1}. ${this.store.pointName(t)}`;
  }
}
