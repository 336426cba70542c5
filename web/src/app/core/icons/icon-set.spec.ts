import fs from 'node:fs';
import path from 'node:path';
import iconSet from './icon-set.json';

/**
 * The icon font ships only the icons in icon-set.json (scripts/build-icon-font.mjs subsets the Material
 * Symbols font to them). An icon written in a template but missing from the set would show as its
 * name in letters, so every use must be in the set, and every entry must still be used.
 */
const APP_DIR = path.resolve(__dirname, '..', '..');
/** The contracts' word lists carry the icons of states (batch, intake file) that the pages show. */
const CONTRACTS_DIR = path.resolve(__dirname, '..', '..', '..', '..', '..', 'server', 'src', 'contracts');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(full);
    return /\.(html|ts)$/.test(entry.name) && !entry.name.endsWith('.spec.ts') ? [full] : [];
  });
}

/** The literal results of `{{ a ? 'x' : 'y' }}` (not the operands of a comparison). */
const choices = (text: string): string[] =>
  [...text.matchAll(/[?:]\s*(?:'([^']*)'|"([^"]*)")/g)].map((m) => m[1] ?? m[2]);

const MAT_ICON = /<mat-icon\b([^>]*)>([^<]*)<\/mat-icon\s*>/g;

/** `<mat-icon>` elements the scanner cannot read (markup inside, or an icon bound some other way). */
export function unreadableIcons(source: string): number {
  return (source.match(/<mat-icon\b/g) ?? []).length - [...source.matchAll(MAT_ICON)].length;
}

/** Icon names a source file uses: `<mat-icon>` text (literals inside `{{ }}` too), `fontIcon`, `icon:` entries. */
export function iconsUsedIn(source: string): string[] {
  const names: string[] = [];
  for (const m of source.matchAll(MAT_ICON)) {
    const [, attributes, content] = m;
    names.push(...[...attributes.matchAll(/\bfontIcon="([^"]+)"/g)].map((a) => a[1]));
    const text = content.trim();
    if (text.startsWith('{{')) names.push(...choices(text));
    else if (text) names.push(text);
  }
  for (const m of source.matchAll(/\bicon:\s*(['"])([^'"]+)\1/g)) names.push(m[2]);
  return names;
}

describe('the icon set the icon font is cut to', () => {
  const files = [...sourceFiles(APP_DIR), ...sourceFiles(CONTRACTS_DIR)];
  const used = new Map<string, string[]>();
  for (const file of files) {
    for (const name of iconsUsedIn(fs.readFileSync(file, 'utf8'))) {
      used.set(name, [...(used.get(name) ?? []), path.relative(APP_DIR, file)]);
    }
  }
  const set = new Set<string>(iconSet);

  it('when a template or a display list uses an icon, then the set holds it', () => {
    const missing = [...used.entries()]
      .filter(([name]) => !set.has(name))
      .map(([name, where]) => `${name} (${where.join(', ')})`);
    expect(missing).toEqual([]);
  });

  it('when a file has a <mat-icon>, then its icon name can be read from the source', () => {
    const unreadable = files.filter((file) => unreadableIcons(fs.readFileSync(file, 'utf8')) !== 0);
    expect(unreadable.map((file) => path.relative(APP_DIR, file))).toEqual([]);
  });

  // That each name is a ligature of the font is checked where the font is cut (build-icon-font.mjs).
  it('when an icon is in the set, then something still uses it', () => {
    expect(iconSet.filter((name) => !used.has(name))).toEqual([]);
    expect([...iconSet]).toEqual([...set].sort());
  });

  it('finds icons in every form the templates use, and notices a form it cannot read', () => {
    expect(unreadableIcons('<mat-icon><span>home</span></mat-icon>')).toBe(1);
    expect(
      iconsUsedIn(`
        <mat-icon inline aria-hidden="true">flag</mat-icon>
        <mat-icon>{{ live.connected() ? 'sensors' : "sensors_off" }}</mat-icon
        >
        <mat-icon>{{ x.flag === 'saturated' ? 'vertical_align_top' : 'remove' }}</mat-icon>
        <mat-icon fontIcon="home"></mat-icon>
        <mat-icon>{{ item.icon }}</mat-icon>
        const STATES = { open: { label: 'Open', icon: 'pending' } };`),
    ).toEqual(['flag', 'sensors', 'sensors_off', 'vertical_align_top', 'remove', 'home', 'pending']);
  });
});
