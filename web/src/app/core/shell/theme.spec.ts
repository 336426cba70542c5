import { applyStoredTheme, isDark, setDark } from './theme';

describe('the light or dark theme', () => {
  afterEach(() => {
    localStorage.clear();
    document.documentElement.classList.remove('eq-dark');
  });

  it('when nothing is stored then the page starts light', () => {
    applyStoredTheme();
    expect(isDark()).toBe(false);
  });

  it('when dark was chosen before then the page starts dark, before the app renders', () => {
    setDark(true);
    document.documentElement.classList.remove('eq-dark');
    applyStoredTheme();
    expect(isDark()).toBe(true);
  });

  it('when light is chosen again then it is shown and remembered', () => {
    setDark(true);
    setDark(false);
    applyStoredTheme();
    expect(isDark()).toBe(false);
    expect(localStorage.getItem('equilight.dark')).toBe('0');
  });
});
