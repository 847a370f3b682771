import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { TubePin } from '@domain/template-format';
import { SocketView } from '../../../shared/socket-view/socket-view';
import { EditorStore } from '../editor-store';

export interface PinUse {
  pin: TubePin;
  node: string;
  components: { key: string; ref: string; other: string }[];
  testPoints: { key: string; name: string }[];
}

/** One socket: designator, tube type from the library (its pins fill from it), the bottom view with what sits on each pin. */
@Component({
  selector: 'dm-socket-panel',
  imports: [MatFormFieldModule, MatInputModule, MatAutocompleteModule, MatButtonModule, MatIconModule, SocketView],
  templateUrl: './socket-panel.html',
  styleUrls: ['../editor-forms.scss', './socket-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SocketPanel {
  protected readonly store = inject(EditorStore);
  protected readonly stage = computed(() => this.store.selectedStage()!);
  protected readonly socket = computed(() => this.store.selectedSocket()!);
  protected readonly tubeType = computed(() => this.store.tubeTypes().get(this.socket().tubeType) ?? null);
  protected readonly typed = signal<string | null>(null);
  protected readonly selectedPin = signal<number | null>(null);
  protected readonly designatorError = signal<string | null>(null);

  protected readonly library = computed(() => {
    const t = (this.typed() ?? '').trim().toUpperCase();
    return [...this.store.tubeTypes().values()].filter((x) => x.designation.startsWith(t) || t === '').slice(0, 60);
  });

  /** What sits on each pin: components with a node there, test points that probe it. */
  protected readonly uses = computed<PinUse[]>(() => {
    const tt = this.tubeType();
    const doc = this.store.doc()!;
    const d = this.socket().designator;
    if (tt === null) return [];
    return tt.pins.map((pin) => {
      const node = `${d}.${pin.pin}`;
      const components = doc.components
        .filter((c) => c.nodes.includes(node) || c.wiper?.node === node)
        .map((c) => ({ key: c.key, ref: c.ref, other: c.nodes[0] === node ? c.nodes[1] : c.nodes[0] }));
      const keys = new Set(components.map((c) => c.key));
      const testPoints = doc.testPoints
        .filter((t) => (t.kind === 'chart-reading' && (t.from === node || t.to === node)) || (t.kind === 'component-check' && keys.has(t.componentKey)))
        .map((t) => ({ key: t.key, name: `${doc.testPoints.indexOf(t) + 1}. ${this.store.pointName(t)}` }));
      return { pin, node, components, testPoints };
    });
  });

  protected readonly selectedUse = computed(() => this.uses().find((u) => u.pin.pin === this.selectedPin()) ?? null);

  protected problem(field: string): string | null {
    const so = this.socket();
    return this.store.problemsAt({ kind: 'socket', key: so.key }, field)[0]?.message ?? null;
  }

  protected setDesignator(text: string): void {
    const d = text.trim().toUpperCase();
    if (!/^[A-Z]+[0-9]+[A-Z]?$/.test(d)) {
      this.designatorError.set('A designator is letters then a number: V1, V5, RY1.');
      return;
    }
    const clash = this.store.doc()!.stages.some((s) => s.sockets.some((so) => so.designator === d && so.key !== this.socket().key));
    if (clash) {
      this.designatorError.set(`${d} is another socket already.`);
      return;
    }
    this.designatorError.set(null);
    this.store.updateSocket(this.stage().key, this.socket().key, { designator: d });
  }

  protected setTubeType(text: string): void {
    const so = this.store.selectedSocket();
    const t = text.trim().toUpperCase();
    this.typed.set(null);
    // The input's change and the autocomplete's selection may both report the same choice.
    if (!so || so.tubeType === t) return;
    this.store.updateSocket(this.stage().key, so.key, { tubeType: t });
  }

  protected openComponent(key: string): void {
    const c = this.store.doc()!.components.find((x) => x.key === key);
    if (!c) return;
    this.store.select({ kind: 'stage', stageKey: c.stageKey });
    this.store.editing.set({ kind: 'component', key });
  }

  protected openPoint(key: string): void {
    const t = this.store.doc()!.testPoints.find((x) => x.key === key);
    if (!t) return;
    this.store.select({ kind: 'stage', stageKey: t.stageKey });
    this.store.editing.set({ kind: 'test-point', key });
  }

  protected remove(): void {
    const so = this.socket();
    if (confirm(`Remove socket ${so.designator}? Components on its pins stay (their nodes will show as unknown).`)) this.store.removeSocket(this.stage().key, so.key);
  }
}
