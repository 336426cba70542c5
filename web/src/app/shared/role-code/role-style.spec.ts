import { ROLE_PATTERN_TILE } from '@equilight/contracts';
import { ROLE_CODE, ROLE_STYLE, SAMPLE_ROLES, prepareRoleImages } from './role-style';

describe('role images', () => {
  afterEach(() => jest.useRealTimers());

  it('each role is painted with one pattern tile, repeated at its own size (the drawing: role-pattern.e2e.ts)', () => {
    for (const role of SAMPLE_ROLES) {
      const style = ROLE_STYLE[role];
      expect(style.imageUrl).toMatch(/^data:image\/svg\+xml,/);
      expect(style.backgroundImage).toBe(`url("${style.imageUrl}")`);
      const t = ROLE_PATTERN_TILE;
      expect(style.backgroundSize).toBe(`${t}px ${t}px`);
      const svg = decodeURIComponent(style.imageUrl);
      expect(svg).toContain(`width="${t}" height="${t}" viewBox="0 0 ${t} ${t}"`);
      expect(svg).toContain(`fill="${ROLE_CODE[role].fill}"`);
    }
  });

  it('prepareRoleImages loads every role image once, each in a task after the caller', () => {
    jest.useFakeTimers();
    const RealImage = window.Image;
    const created: HTMLImageElement[] = [];
    const spy = jest.spyOn(window, 'Image').mockImplementation(() => {
      const image = new RealImage();
      created.push(image);
      return image;
    });
    try {
      prepareRoleImages();
      expect(created).toHaveLength(SAMPLE_ROLES.length);
      expect(created.map((i) => i.getAttribute('src'))).toEqual(SAMPLE_ROLES.map(() => null));
      expect(jest.getTimerCount()).toBe(SAMPLE_ROLES.length);

      jest.runAllTimers();
      expect(created.map((i) => i.getAttribute('src'))).toEqual(
        SAMPLE_ROLES.map((r) => ROLE_STYLE[r].imageUrl),
      );

      prepareRoleImages();
      expect(created).toHaveLength(SAMPLE_ROLES.length);
      expect(jest.getTimerCount()).toBe(0);
    } finally {
      spy.mockRestore();
    }
  });
});
