import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { VERDICT_LABELS, Verdict } from '@domain/words';

/** One glyph per verdict, each a different shape, so the verdict never rests on colour (WCAG 2.2, 1.4.1). */
export const VERDICT_GLYPHS: Readonly<Record<Verdict, string>> = {
  'in-band': 'check_circle',
  'near-limit': 'adjust',
  high: 'arrow_upward',
  low: 'arrow_downward',
  open: 'link_off',
  short: 'bolt',
  inconclusive: 'help',
  'not-read': 'remove',
};

/** Tone = which token pair colours it; the glyph and the word carry the meaning. */
type Tone = 'good' | 'watch' | 'out' | 'none';
const TONES: Readonly<Record<Verdict, Tone>> = {
  'in-band': 'good',
  'near-limit': 'watch',
  high: 'out',
  low: 'out',
  open: 'out',
  short: 'out',
  inconclusive: 'watch',
  'not-read': 'none',
};

/** A verdict as glyph + word (`VERDICT_LABELS` from the domain). */
@Component({
  selector: 'dm-verdict-badge',
  imports: [MatIconModule],
  template: `<mat-icon aria-hidden="true">{{ glyph() }}</mat-icon><span class="word">{{ label() }}</span>`,
  styleUrl: './verdict-badge.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '[class]': "'tone-' + tone()",
    '[attr.data-verdict]': 'verdict()',
  },
})
export class VerdictBadge {
  readonly verdict = input.required<Verdict>();
  protected readonly label = computed(() => VERDICT_LABELS[this.verdict()]);
  protected readonly glyph = computed(() => VERDICT_GLYPHS[this.verdict()]);
  protected readonly tone = computed(() => TONES[this.verdict()]);
}
