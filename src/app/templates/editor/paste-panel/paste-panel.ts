import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { EditorStore } from '../editor-store';
import { PASTE_COLUMNS, previewParts, type PastePreview } from '../parts-paste';

export const PASTE_EXAMPLE = ['ref\tvalue\ttolerance\trating\tkind\tnode a\tnode b', 'R1\t470k\t10\t½\tcarbon\tV1.7\tchassis', 'R2\t4K7\tK\t1W\t\tB+1\tV1.6', 'C1\t0.05\t\t400V\tpaper\tV1.6\tV2.1'].join('\n');

/** Paste a parts list: a preview of every row (its reading and problems) before anything is added. */
@Component({
  selector: 'dm-paste-panel',
  imports: [MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './paste-panel.html',
  styleUrls: ['../editor-forms.scss', './paste-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PastePanel {
  readonly stageKey = input.required<string>();
  readonly closed = output<void>();
  protected readonly store = inject(EditorStore);
  protected readonly columns = PASTE_COLUMNS;
  protected readonly example = PASTE_EXAMPLE;
  protected readonly text = signal('');
  protected readonly preview = computed<PastePreview | null>(() => {
    const t = this.text();
    const doc = this.store.doc();
    return t.trim() === '' || doc === null ? null : previewParts(t, doc, this.store.tubeTypes());
  });

  protected apply(): void {
    const p = this.preview();
    if (p === null || p.good === 0) return;
    const rows = p.rows.filter((r) => r.part !== null);
    this.store.applyPaste(
      this.stageKey(),
      rows.map((r) => r.part!),
      [...new Set(rows.flatMap((r) => r.newJunctions))],
    );
    this.text.set('');
    this.closed.emit();
  }
}
