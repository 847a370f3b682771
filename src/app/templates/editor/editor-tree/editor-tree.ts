import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { EditorStore, type Selection } from '../editor-store';

/** The outline: chassis, stages with their sockets, the capacitor list and the network. */
@Component({
  selector: 'dm-editor-tree',
  imports: [MatButtonModule, MatIconModule],
  templateUrl: './editor-tree.html',
  styleUrl: './editor-tree.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EditorTree {
  protected readonly store = inject(EditorStore);
  protected readonly doc = computed(() => this.store.doc()!);
  protected readonly counts = computed(() => {
    const d = this.doc();
    const out = new Map<string, { parts: number; points: number; problems: number }>();
    for (const s of d.stages) out.set(s.key, { parts: 0, points: 0, problems: 0 });
    for (const c of d.components) {
      const x = out.get(c.stageKey);
      if (x) x.parts++;
    }
    for (const t of d.testPoints) {
      const x = out.get(t.stageKey);
      if (x) x.points++;
    }
    for (const p of this.store.allProblems()) {
      const t = p.target;
      const key = t.kind === 'stage' ? t.key : t.kind === 'socket' || t.kind === 'component' || t.kind === 'test-point' ? t.stageKey : null;
      const x = key === null ? undefined : out.get(key);
      if (x && p.severity === 'error') x.problems++;
    }
    return out;
  });
  protected readonly networkErrors = computed(() => this.store.networkProblems().filter((p) => p.severity === 'error').length + this.store.disagreements().size);
  protected readonly capacitorErrors = computed(() => this.store.capacitorFindings().filter((f) => f.severity === 'error').length);

  protected is(sel: Selection): boolean {
    const s = this.store.selection();
    if (s.kind !== sel.kind) return false;
    if (s.kind === 'stage' && sel.kind === 'stage') return s.stageKey === sel.stageKey;
    if (s.kind === 'socket' && sel.kind === 'socket') return s.socketKey === sel.socketKey;
    return true;
  }
}
