import { ChangeDetectionStrategy, Component } from '@angular/core';
import { RouterLink } from '@angular/router';

/** Placeholder for the quick check page (to be replaced). */
@Component({
  selector: 'dm-calc-placeholder',
  imports: [RouterLink],
  template: `
    <div class="dm-page">
      <h1>Quick check</h1>
      <p>The quick check of a single reading against its band is coming here soon.</p>
      <p><a routerLink="/">Back to the start page</a></p>
    </div>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CalcPlaceholder {}
