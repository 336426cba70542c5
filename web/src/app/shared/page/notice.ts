import { Injectable, Injector, inject } from '@angular/core';

export interface NoticeOptions {
  /** The button's text ("OK"); none, and the notice has no button. */
  action?: string;
  /** How long it stays, ms; none, and it stays until its button is pressed. */
  durationMs?: number;
}

/**
 * A short message at the foot of the screen (Material's snack-bar). The snack-bar and its overlay load on
 * the first message, not with the page that may show one: a page that rarely speaks pays nothing for it
 * while it renders.
 */
@Injectable({ providedIn: 'root' })
export class Notice {
  private readonly injector = inject(Injector);

  async show(message: string, options: NoticeOptions = {}): Promise<void> {
    const { MatSnackBar } = await import('@angular/material/snack-bar');
    this.injector.get(MatSnackBar).open(message, options.action, { duration: options.durationMs });
  }
}
