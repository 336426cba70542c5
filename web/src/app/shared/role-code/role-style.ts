import {
  ROLE_CODE,
  ROLE_PATTERN_OPACITY,
  ROLE_PATTERN_TILE,
  type RoleCode,
  type SampleRole,
  rolePatternMarks,
} from '@equilight/contracts';

export { ROLE_CODE, SAMPLE_ROLES, type RoleCode, type SampleRole } from '@equilight/contracts';

/** How the web draws one role: the contracts' colours, and the pattern as an SVG `<pattern>` fill. */
export interface RoleStyle {
  /** A CSS `background-image`: an SVG that fills its box with the role's colour and pattern. */
  backgroundImage: string;
  /** That SVG as a `data:` URL. */
  imageUrl: string;
  fill: string;
  ink: string;
}

const round = (v: number) => Number(v.toFixed(3));

/** The SVG (as text) of a box filled with the role's colour and covered with its pattern. */
export function rolePatternSvg(code: RoleCode): string {
  const t = ROLE_PATTERN_TILE;
  const marks = rolePatternMarks(code.pattern, t);
  const lines = marks.lines
    .map(
      ([x1, y1, x2, y2]) => `<line x1="${round(x1)}" y1="${round(y1)}" x2="${round(x2)}" y2="${round(y2)}"/>`,
    )
    .join('');
  const dots = marks.dots
    .map(([cx, cy, r]) => `<circle cx="${round(cx)}" cy="${round(cy)}" r="${round(r)}"/>`)
    .join('');
  const pattern =
    `<pattern id="p" width="${t}" height="${t}" patternUnits="userSpaceOnUse">` +
    `<g stroke="${code.ink}" fill="${code.ink}" stroke-width="${round(marks.lineWidth)}" ` +
    `opacity="${ROLE_PATTERN_OPACITY}">${lines}${dots}</g></pattern>`;
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="100%" height="100%"><defs>${pattern}</defs>` +
    `<rect width="100%" height="100%" fill="${code.fill}"/><rect width="100%" height="100%" fill="url(#p)"/></svg>`
  );
}

function styleOf(code: RoleCode): RoleStyle {
  const imageUrl = `data:image/svg+xml,${encodeURIComponent(rolePatternSvg(code))}`;
  return { backgroundImage: `url("${imageUrl}")`, imageUrl, fill: code.fill, ink: code.ink };
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
