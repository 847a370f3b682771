import { ChangeDetectionStrategy, Component } from '@angular/core';
import { Shell } from './core/shell/shell';

@Component({
  selector: 'dm-root',
  imports: [Shell],
  template: '<dm-shell />',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class App {}
