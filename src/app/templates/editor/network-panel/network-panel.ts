import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { parseNodeName } from '@domain/template-format';
import { EditorStore } from '../editor-store';

/** The chassis network's problems, the chart readings it disagrees with, and the junctions. */
@Component({
  selector: 'dm-network-panel',
  imports: [MatButtonModule, MatIconModule, MatFormFieldModule, MatInputModule],
  templateUrl: './network-panel.html',
  styleUrl: '../editor-forms.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NetworkPanel {
  protected readonly store = inject(EditorStore);
  protected readonly edges = computed(() => this.store.network()?.edges.length ?? 0);
  protected readonly disagreements = computed(() => [...this.store.disagreements().values()]);
  protected readonly newName = signal('');
  protected readonly nameError = signal<string | null>(null);

  protected pointName(key: string): string {
    const tp = this.store.doc()!.testPoints.find((t) => t.key === key);
    return tp ? this.store.pointName(tp) : key;
  }

  protected openPoint(key: string): void {
    const t = this.store.doc()!.testPoints.find((x) => x.key === key);
    if (!t) return;
    this.store.select({ kind: 'stage', stageKey: t.stageKey });
    this.store.editing.set({ kind: 'test-point', key });
  }

  protected addJunction(): void {
    const name = this.newName().trim();
    if (name === '' || parseNodeName(name).kind !== 'other') {
      this.nameError.set('A junction name is not a pin (V3.7) nor chassis, B- or B+: e.g. B+1, AVC.');
      return;
    }
    if (this.store.doc()!.junctions.some((j) => j.name === name)) {
      this.nameError.set(`${name} is declared already.`);
      return;
    }
    this.nameError.set(null);
    this.store.addJunction(name);
    this.newName.set('');
  }

  protected uses(name: string): number {
    return this.store.doc()!.components.filter((c) => c.nodes.includes(name)).length;
  }
}
