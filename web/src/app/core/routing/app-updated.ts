/**
 * A page's code, dialogs and sections load as separate scripts when first needed. A tab opened before the
 * server got a new build asks for scripts the new build no longer has: the import fails. These helpers
 * tell such a failure from others and offer the one remedy, loading the page afresh.
 */

/** The browsers' messages for a module script that could not be fetched (Chromium, Firefox, Safari). */
const SCRIPT_NOT_LOADED =
  /dynamically imported module|importing a module script failed|module script failed/i;

/** True when `err` is the browser failing to fetch one of the app's scripts. */
export function isScriptLoadError(err: unknown): boolean {
  const message = err instanceof Error ? err.message : typeof err === 'string' ? err : '';
  return SCRIPT_NOT_LOADED.test(message);
}

export const APP_UPDATED_TEXT =
  'Equilight has been updated since this page was opened, and part of it can no longer be loaded.';

/** What `offerReload` needs of the window; tests pass their own. */
export interface ReloadWindow {
  confirm(message: string): boolean;
  location: { href: string; assign(url: string): void };
}

/**
 * Asks the person whether to load the page afresh (at `url`, by default where they are), after `first`
 * (a message the failure would otherwise have swallowed). Asked, not done: the page may hold unsaved work.
 */
export function offerReload(
  options: { url?: string; first?: string } = {},
  win: ReloadWindow = window,
): boolean {
  const question = `${options.first ? `${options.first}\n\n` : ''}${APP_UPDATED_TEXT} Reload the page now?`;
  if (!win.confirm(question)) return false;
  win.location.assign(options.url ?? win.location.href);
  return true;
}

/**
 * `load()`, and when its script cannot be fetched, the offer to reload and null; any other failure is
 * passed on.
 */
export async function loadOrOfferReload<T>(load: () => Promise<T>, first?: string): Promise<T | null> {
  try {
    return await load();
  } catch (err) {
    if (!isScriptLoadError(err)) throw err;
    offerReload({ first });
    return null;
  }
}
