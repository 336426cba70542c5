import { APP_UPDATED_TEXT, isScriptLoadError, loadOrOfferReload, offerReload } from './app-updated';

/** A window that records what it was asked and where it was sent. */
function fakeWindow(answer: boolean) {
  const asked: string[] = [];
  const sentTo: string[] = [];
  return {
    asked,
    sentTo,
    win: {
      confirm: (message: string) => {
        asked.push(message);
        return answer;
      },
      location: { href: 'http://lab.test/batches/7', assign: (url: string) => void sentTo.push(url) },
    },
  };
}

describe('a script of the app that can no longer be fetched', () => {
  it('is told apart from other failures by the browsers’ messages', () => {
    // The browsers' texts, from memory; the Chromium one is also met for real by web/e2e/app-updated.e2e.ts.
    for (const message of [
      'Failed to fetch dynamically imported module: http://lab.test/chunk-AB12CD34.js', // Chromium
      'error loading dynamically imported module: http://lab.test/chunk-AB12CD34.js', // Firefox
      'Importing a module script failed.', // Safari
    ])
      expect(isScriptLoadError(new TypeError(message))).toBe(true);
    for (const other of [new Error('The server answered with an unexpected batch record.'), null, 42])
      expect(isScriptLoadError(other)).toBe(false);
  });

  it('when the person agrees, then the page loads afresh where asked; when not, nothing moves', () => {
    const yes = fakeWindow(true);
    expect(offerReload({ url: '/instruments' }, yes.win)).toBe(true);
    expect(yes.sentTo).toEqual(['/instruments']);
    expect(yes.asked[0]).toContain(APP_UPDATED_TEXT);

    const here = fakeWindow(true);
    offerReload({}, here.win);
    expect(here.sentTo).toEqual(['http://lab.test/batches/7']);

    const no = fakeWindow(false);
    expect(offerReload({ first: 'Saved.' }, no.win)).toBe(false);
    expect(no.sentTo).toEqual([]);
    expect(no.asked[0].startsWith('Saved.\n\n')).toBe(true);
  });

  it('when a script loads, its module comes; when it cannot be fetched, null after the offer; other errors pass on', async () => {
    await expect(loadOrOfferReload(() => Promise.resolve({ value: 1 }))).resolves.toEqual({ value: 1 });

    const confirm = jest.spyOn(window, 'confirm').mockReturnValue(false);
    try {
      const gone = () => Promise.reject(new TypeError('Failed to fetch dynamically imported module: x.js'));
      await expect(loadOrOfferReload(gone, 'Reopened.')).resolves.toBeNull();
      expect(confirm).toHaveBeenCalledWith(expect.stringContaining('Reopened.'));

      const broken = () => Promise.reject(new RangeError('a fault in the module itself'));
      await expect(loadOrOfferReload(broken)).rejects.toThrow('a fault in the module itself');
      expect(confirm).toHaveBeenCalledTimes(1);
    } finally {
      confirm.mockRestore();
    }
  });
});
