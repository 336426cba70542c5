import {
  ROLE_CODE,
  ROLE_PATTERN_OPACITY,
  ROLE_PATTERN_TILE,
  type RoleCode,
  type SampleRole,
  rolePatternMarks,
} from '@equilight/contracts';

export { ROLE_CODE, SAMPLE_ROLES, type RoleCode, type SampleRole } from '@equilight/contracts';

/** How the web draws one role: the contracts' colours, and the pattern as an SVG tile repeated over the box. */
export interface RoleStyle {
  /** A CSS `background-image`: one tile of the role's colour and pattern, repeated (see `backgroundSize`). */
  backgroundImage: string;
  /** That tile's SVG as a `data:` URL. */
  imageUrl: string;
  /** A CSS `background-size`: the tile's size, so the pattern keeps its scale in a box of any size. */
  backgroundSize: string;
  fill: string;
  ink: string;
}

const round = (v: number) => Number(v.toFixed(3));

/**
 * A role's pattern marks for one tile (`ROLE_PATTERN_TILE` px square) as an SVG group in the role's ink;
 * the marks continue into the neighbouring tiles.
 */
export function rolePatternMarksSvg(code: RoleCode): string {
  const marks = rolePatternMarks(code.pattern, ROLE_PATTERN_TILE);
  const lines = marks.lines
    .map(
      ([x1, y1, x2, y2]) => `<line x1="${round(x1)}" y1="${round(y1)}" x2="${round(x2)}" y2="${round(y2)}"/>`,
    )
    .join('');
  const dots = marks.dots
    .map(([cx, cy, r]) => `<circle cx="${round(cx)}" cy="${round(cy)}" r="${round(r)}"/>`)
    .join('');
  return (
    `<g stroke="${code.ink}" fill="${code.ink}" stroke-width="${round(marks.lineWidth)}" ` +
    `opacity="${ROLE_PATTERN_OPACITY}">${lines}${dots}</g>`
  );
}

/**
 * The SVG (as text) of one pattern tile: the role's colour covered with its marks. Repeated as a background
 * from a box's top left corner, it shows the pattern at the same scale whatever the box's size, and the
 * browser lays the image out and records its drawing once for all boxes; an SVG sized to each box cost
 * every box its own (npm run bench:role-marks: 3–4× the style, layout, paint and raster time).
 */
export function rolePatternSvg(code: RoleCode): string {
  const t = ROLE_PATTERN_TILE;
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${t}" height="${t}" viewBox="0 0 ${t} ${t}">` +
    `<rect width="${t}" height="${t}" fill="${code.fill}"/>${rolePatternMarksSvg(code)}</svg>`
  );
}

function styleOf(code: RoleCode): RoleStyle {
  const imageUrl = `data:image/svg+xml,${encodeURIComponent(rolePatternSvg(code))}`;
  return {
    backgroundImage: `url("${imageUrl}")`,
    imageUrl,
    backgroundSize: `${ROLE_PATTERN_TILE}px ${ROLE_PATTERN_TILE}px`,
    fill: code.fill,
    ink: code.ink,
  };
}

/** Each role's drawing, built once from the contracts' role code. */
export const ROLE_STYLE: Readonly<Record<SampleRole, RoleStyle>> = {
  blank: styleOf(ROLE_CODE.blank),
  standard: styleOf(ROLE_CODE.standard),
  unknown: styleOf(ROLE_CODE.unknown),
  mixture: styleOf(ROLE_CODE.mixture),
  control: styleOf(ROLE_CODE.control),
};

/** The roles' images, loaded ahead of the first view that paints them; kept so the browser keeps them. */
const preparedImages: HTMLImageElement[] = [];

/**
 * Has the browser set up the roles' SVG images before a view paints them: each costs 1.5–2 ms of the main
 * thread the first time (an SVG document of its own), which a plate map would otherwise pay for every role
 * inside the one frame that shows it. Call it where a page knows role marks will follow (its data is on the
 * way); a second call does nothing. Each image is set up in a task of its own.
 */
export function prepareRoleImages(): void {
  if (preparedImages.length || typeof Image === 'undefined') return;
  for (const { imageUrl } of Object.values(ROLE_STYLE)) {
    const image = new Image();
    preparedImages.push(image);
    // A data: URL loads at once, inside the caller's task: one task each keeps them all out of it.
    setTimeout(() => (image.src = imageUrl));
  }
}

/** The role of a text (layout or manifest answer), or null when it names none. */
export function asSampleRole(value: string | null | undefined): SampleRole | null {
  return value && Object.hasOwn(ROLE_CODE, value) ? (value as SampleRole) : null;
}
