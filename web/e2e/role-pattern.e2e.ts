import type { Browser, Page } from 'playwright-core';
import { ROLE_CODE, SAMPLE_ROLES } from '@equilight/contracts';
import { ROLE_STYLE } from '../src/app/shared/role-code/role-style';
import { launchChromium } from './support/browser';
import { perBoxPatternSvg } from './support/role-pattern-reference';

jest.setTimeout(120_000);

// The role marks are drawn as one pattern tile repeated over the box (cheap for the browser to lay out and
// draw in any number of boxes). This checks, in Chromium, that what a box shows is the pattern as the
// contracts define it: an SVG <pattern> of the contracts' marks, tiled from the box's top left corner over
// the role's fill, drawn at the box's own size.

const SIZES = [16, 22, 26, 34, 47];

/** Largest difference of any colour channel of any pixel between two element screenshots (0–255). */
async function largestDifference(page: Page, a: Buffer, b: Buffer): Promise<number> {
  return page.evaluate(
    async ([a64, b64]) => {
      const load = (b: string) =>
        new Promise<HTMLImageElement>((resolve) => {
          const image = new Image();
          image.onload = () => resolve(image);
          image.src = `data:image/png;base64,${b}`;
        });
      const pixels = (image: HTMLImageElement) => {
        const canvas = document.createElement('canvas');
        [canvas.width, canvas.height] = [image.width, image.height];
        const context = canvas.getContext('2d')!;
        context.drawImage(image, 0, 0);
        return context.getImageData(0, 0, canvas.width, canvas.height).data;
      };
      const [pa, pb] = (await Promise.all([load(a64), load(b64)])).map(pixels);
      if (pa.length !== pb.length) return 255;
      let largest = 0;
      for (let i = 0; i < pa.length; i++) largest = Math.max(largest, Math.abs(pa[i] - pb[i]));
      return largest;
    },
    [a.toString('base64'), b.toString('base64')] as const,
  );
}

describe('role patterns in Chromium', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchChromium();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it.each([1, 2])(
    'at device pixel ratio %i each role box shows the contracts’ pattern at its own size',
    async (ratio) => {
      const page = await browser.newPage({ deviceScaleFactor: ratio });
      const box = (id: string, style: Record<string, string>) =>
        `<div id="${id}" style="width:var(--s);height:var(--s);${Object.entries(style)
          .map(([k, v]) => `${k}:${v.replace(/"/g, "'")}`)
          .join(';')}"></div>`;
      let html = '<body style="margin:0;background:#fff">';
      for (const role of SAMPLE_ROLES) {
        const reference = `url('data:image/svg+xml,${encodeURIComponent(perBoxPatternSvg(ROLE_CODE[role]))}')`;
        for (const size of SIZES)
          html +=
            `<div style="--s:${size}px;display:flex;gap:8px;margin:4px">` +
            box(`shown-${role}-${size}`, {
              'background-image': ROLE_STYLE[role].backgroundImage,
              'background-size': ROLE_STYLE[role].backgroundSize,
            }) +
            box(`reference-${role}-${size}`, {
              'background-image': reference,
              'background-size': '100% 100%',
            }) +
            box(`plain-${role}-${size}`, { background: ROLE_CODE[role].fill }) +
            `</div>`;
      }
      await page.setContent(html);
      const shot = (id: string) => page.locator(`#${id}`).screenshot();
      const unlike: { role: string; size: number; difference: number }[] = [];
      const unpatterned: { role: string; size: number }[] = [];
      for (const role of SAMPLE_ROLES)
        for (const size of SIZES) {
          const shown = await shot(`shown-${role}-${size}`);
          // Same pixels as the definition (a little room for anti-aliasing differences between versions).
          const difference = await largestDifference(page, shown, await shot(`reference-${role}-${size}`));
          if (difference > 8) unlike.push({ role, size, difference });
          // ...and a pattern with marks is really drawn, not only the fill.
          const plain = await largestDifference(page, shown, await shot(`plain-${role}-${size}`));
          if (ROLE_CODE[role].pattern !== 'solid' && plain <= 40) unpatterned.push({ role, size });
        }
      expect(unlike).toEqual([]);
      expect(unpatterned).toEqual([]);
      await page.close();
    },
  );
});
