import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { VERDICT_LABELS, type Verdict } from '@domain/words';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import type { RowState } from '../survey-session';
import { METHOD_WORDS, STATE_WORDS, bandText, driftText, ohmsOrDash } from '../survey-words';

const OUT: ReadonlySet<Verdict> = new Set<Verdict>(['high', 'low', 'open', 'short']);

/**
 * One row of the bench grid: where to put the probes, what to expect, the entry field, the
 * verdict (glyph and word, at once from the browser; a mark says whether the API has confirmed
 * it), drift and the previous survey's value once this one is keyed. Keys are handled by the
 * page (one listener for the whole grid).
 */
@Component({
  selector: 'tr[dm-grid-row]',
  imports: [MatIconModule, VerdictBadge],
  templateUrl: './grid-row.html',
  styleUrl: './grid-row.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class.out]': 'out()',
    '[class.inconclusive]': "verdict() === 'inconclusive'",
    '[class.pair]': 'state().row.pair !== null',
    '[attr.data-row]': 'state().row.testPointKey',
    '[attr.data-status]': 'state().status',
    '[class.locked]': 'state().locked',
    '[class.predicting]': 'state().predicting',
  },
})
export class GridRow {
  readonly state = input.required<RowState>();
  readonly position = input.required<number>();
  readonly editable = input.required<boolean>();
  readonly error = input<string | null>(null);
  readonly correcting = input(false);
  /** A class survey that shows verdicts only after submission: glyph, word, drift and the implied value stay hidden. */
  readonly verdictsHidden = input(false);

  protected readonly methodWords = METHOD_WORDS;
  protected readonly bandText = bandText;
  protected readonly ohms = ohmsOrDash;

  protected readonly verdict = computed<Verdict | null>(() => {
    const s = this.state();
    if (this.verdictsHidden()) return null;
    return s.pair !== null ? (s.pair.verdict === 'not-read' ? null : s.pair.verdict) : (s.evaluation?.verdict ?? null);
  });
  protected readonly out = computed(() => {
    const v = this.verdict();
    return v !== null && OUT.has(v);
  });
  protected readonly drift = computed(() => this.verdictsHidden() ? '' : driftText(this.state().pair?.driftPct ?? this.state().evaluation?.driftPct ?? null));
  protected readonly readingText = computed(() => {
    const r = this.state().reading;
    if (r === null) return '';
    return r.state === 'value' ? r.text : r.text || STATE_WORDS[r.state];
  });
  protected readonly previousText = computed(() => {
    const p = this.state().previous;
    return p === null ? '' : p.state === 'value' ? p.text : STATE_WORDS[p.state];
  });
  protected readonly where = computed(() => {
    const s = this.state().row.socket;
    return s === null ? '' : `${s.designator} pin ${s.pin}`;
  });
  protected readonly entryLabel = computed(() => {
    const row = this.state().row;
    const what = row.component?.ref ?? `${row.from ?? ''} to ${row.to ?? ''}`;
    const where = `${what}${row.socket ? ` (${row.socket.designator} pin ${row.socket.pin})` : ''}`;
    return this.state().predicting ? `Predict the in-circuit reading for ${where}` : `Reading for ${where}`;
  });
  protected readonly statusWords = computed(() => {
    const s = this.state();
    switch (s.status) {
      case 'confirmed':
        return 'confirmed by the server';
      case 'differs':
        return `the server says ${VERDICT_LABELS[s.serverVerdict ?? 'not-read']}`;
      case 'waiting':
        return 'waiting for the server';
      default:
        return '';
    }
  });
}
