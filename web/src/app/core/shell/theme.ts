/** The reader's light or dark choice, kept in this browser. */
const DARK_KEY = 'equilight.dark';
const DARK_CLASS = 'eq-dark';

/**
 * Puts the stored choice on the page: called once before the app starts (main.ts), so the first paint is
 * already in the right theme, and the browser's storage is opened there rather than in the middle of the
 * first render (its first read waits on the browser process).
 */
export function applyStoredTheme(): void {
  let dark = false;
  try {
    dark = localStorage.getItem(DARK_KEY) === '1';
  } catch {
    // Storage can be switched off; the light theme stays.
  }
  document.documentElement.classList.toggle(DARK_CLASS, dark);
}

/** Whether the page shows the dark theme now. */
export function isDark(): boolean {
  return document.documentElement.classList.contains(DARK_CLASS);
}

/** Shows and remembers the choice. */
export function setDark(dark: boolean): void {
  document.documentElement.classList.toggle(DARK_CLASS, dark);
  try {
    localStorage.setItem(DARK_KEY, dark ? '1' : '0');
  } catch {
    // Not remembered, still shown.
  }
}
