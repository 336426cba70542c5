import { ChangeDetectionStrategy, Component, afterNextRender } from '@angular/core';
import { getSupportedInputTypes } from '@angular/cdk/platform';
import { RouterOutlet } from '@angular/router';

@Component({
  selector: 'eq-root',
  imports: [RouterOutlet],
  template: '<router-outlet />',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class App {
  constructor() {
    // The first text field of a page asks the browser which input types it supports (an input element
    // probed ~20 times); done here in an idle moment, it no longer lengthens that page's first render.
    afterNextRender(() => {
      const idle = globalThis.requestIdleCallback ?? ((run: () => void) => setTimeout(run, 1));
      idle(() => getSupportedInputTypes());
    });
  }
}
