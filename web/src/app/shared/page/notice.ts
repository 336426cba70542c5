import { Injectable, Injector, inject } from '@angular/core';
import { loadOrOfferReload } from '../../core/routing/app-updated';

export interface NoticeOptions {
  /** The button's text ("OK"); none, and the notice has no button. */
  action?: string;
  /** How long it stays, ms; none, and it stays until its button is pressed. */
  durationMs?: number;
}

/**
 * A short message at the foot of the screen (Material's snack-bar). The snack-bar and its overlay load on
 * the first message, not with the page that may show one: a page that rarely speaks pays nothing for it
 * while it renders. When the snack-bar's script cannot be fetched (the app was updated since the page
 * opened), the message comes with the offer to reload, not lost.
 */
@Injectable({ providedIn: 'root' })
export class Notice {
  private readonly injector = inject(Injector);

  async show(message: string, options: NoticeOptions = {}): Promise<void> {
    const loaded = await loadOrOfferReload(() => import('@angular/material/snack-bar'), message);
    if (!loaded) return;
    this.injector.get(loaded.MatSnackBar).open(message, options.action, { duration: options.durationMs });
  }
}
