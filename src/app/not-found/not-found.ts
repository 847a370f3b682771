import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { Router, RouterLink } from '@angular/router';

/** The `'**'` route: the API returns the app shell for any HTML GET, and this page says no. */
@Component({
  selector: 'dm-not-found',
  imports: [RouterLink, MatButtonModule],
  template: `
    <div class="dm-page dm-narrow">
      <h1>Page not found</h1>
      <p>
        There is no page at <code>{{ path }}</code
        >. The link may be mistyped, or the page has moved.
      </p>
      <a mat-flat-button class="dm-touch" routerLink="/">Go to the start page</a>
    </div>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFound {
  protected readonly path = inject(Router).url;
}
