import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { VerdictResult } from '@domain/verdict';
import { bandBarModel } from './band-bar-model';

let nextId = 0;

/**
 * The band drawn to scale as an SVG bar: limits, near-limit zones (hatched), guard band
 * (cross-hatched, under `guarded`), nominal, and the reading with its ±U as an error bar. The
 * drawing says the same in words (`<title>`, `<desc>`), and a legend names each pattern.
 */
@Component({
  selector: 'dm-band-bar',
  templateUrl: './band-bar.html',
  styleUrl: './band-bar.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BandBar {
  readonly result = input.required<VerdictResult>();
  protected readonly model = computed(() => bandBarModel(this.result()));
  protected readonly id = `dm-band-bar-${nextId++}`;
}
