import { ChangeDetectionStrategy, Component, afterNextRender } from '@angular/core';
import { getSupportedInputTypes } from '@angular/cdk/platform';
import { RouterOutlet } from '@angular/router';
import { runWhenIdle } from './core/tasks/when-idle';

@Component({
  selector: 'eq-root',
  imports: [RouterOutlet],
  template: '<router-outlet />',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class App {
  constructor() {
    // Work that every page's first render would otherwise do, done here in idle moments: the first text
    // field asks the browser which input types it supports (an input element probed ~20 times), and the
    // first date shown makes the locale's date formatters.
    afterNextRender(() => {
      runWhenIdle(() => getSupportedInputTypes());
      runWhenIdle(
        () =>
          void import('./shared/format/date-format').then(
            (m) => {
              const next = () => runWhenIdle(() => m.warmDateFormat() && next());
              next();
            },
            () => undefined, // only a head start: the first date shown makes the formatters instead
          ),
      );
    });
  }
}
