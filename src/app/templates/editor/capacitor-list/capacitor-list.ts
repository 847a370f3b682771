import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { CapacitorFinding } from '@domain/capacitor-checks';
import type { Component as Part } from '@domain/template-format';
import { EditorStore } from '../editor-store';

interface CapRow {
  c: Part;
  index: number;
  stage: string;
  findings: CapacitorFinding[];
}

/** The recap kit: every capacitor with µF, volts, kind, polarity, can section, X/Y — and the rule checks (api/domain/capacitor-checks.ts). */
@Component({
  selector: 'dm-capacitor-list',
  imports: [MatButtonModule, MatIconModule],
  templateUrl: './capacitor-list.html',
  styleUrl: '../editor-forms.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CapacitorList {
  protected readonly store = inject(EditorStore);
  protected readonly rows = computed<CapRow[]>(() => {
    const doc = this.store.doc()!;
    const findings = this.store.capacitorFindings();
    return doc.components
      .map((c, index) => ({ c, index }))
      .filter(({ c }) => c.kind === 'capacitor')
      .map(({ c, index }) => ({
        c,
        index,
        stage: doc.stages.find((s) => s.key === c.stageKey)?.name ?? '',
        findings: findings.filter((f) => f.path.startsWith(`components[${index}]`)),
      }));
  });
  /** Findings about the template as a whole (the supply's voltage unknown…). */
  protected readonly general = computed(() => this.store.capacitorFindings().filter((f) => !f.path.startsWith('components[')));
  protected readonly totals = computed(() => {
    const kinds = new Map<string, number>();
    for (const r of this.rows()) {
      const k = r.c.capacitor?.dielectric ?? 'unknown';
      kinds.set(k, (kinds.get(k) ?? 0) + 1);
    }
    return [...kinds.entries()].map(([k, n]) => `${n} ${k}`).join(', ');
  });

  protected open(r: CapRow): void {
    this.store.select({ kind: 'stage', stageKey: r.c.stageKey });
    this.store.editing.set({ kind: 'component', key: r.c.key });
  }
}
