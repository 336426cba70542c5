import fs from 'node:fs';
import path from 'node:path';

/**
 * The sample-role code is defined once, in contracts/role-code.ts. This test fails when a page, a
 * stylesheet or a report defines role colours of its own: a colour literal within two lines of a role
 * name used as a key, selector or argument.
 */
const REPO = path.resolve(__dirname, '../../../..');
const ROOTS = ['web/src', 'server/src/reports'];
const COLOUR = /#[0-9a-fA-F]{3,8}\b|\brgba?\(|\bhsla?\(|\boklch\(|\blab\(/;
const ROLE_KEY = /(['"\s.[(=-])(blank|standard|unknown|mixture|control)s?\b\s*['"\]]?\s*[:=,)\]?]/;

function files(dir: string, out: string[] = []): string[] {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) files(p, out);
    else if (/\.(ts|scss|css|html)$/.test(entry.name) && !/\.spec\.ts$/.test(entry.name)) out.push(p);
  }
  return out;
}

/** Lines that hold a colour next to a role name, as "file:line: text". */
function ownRoleColours(file: string, text: string): string[] {
  const lines = text.split('\n');
  return lines.flatMap((line, i) => {
    if (!COLOUR.test(line)) return [];
    const around = lines.slice(Math.max(0, i - 2), i + 3).join('\n');
    return ROLE_KEY.test(around) ? [`${file}:${i + 1}: ${line.trim()}`] : [];
  });
}

describe('the role code has one source', () => {
  it('when a table of role colours is written somewhere then the check finds it', () => {
    expect(
      ownRoleColours('x.ts', "const C = {\n  blank: '#cfd8dc',\n  standard: '#90caf9',\n};"),
    ).toHaveLength(2);
    expect(ownRoleColours('x.scss', "&[data-role='unknown'] {\n  background: #6fa8dc;\n}")).toHaveLength(1);
    expect(ownRoleColours('x.ts', "fillColor(role === 'control' ? 'rgb(0 0 0)' : ink)")).toHaveLength(1);
    // a colour with no role beside it is not a role colour
    expect(ownRoleColours('x.ts', "const INK = '#1b1b1f';\nconst MUTED = '#5f6368';")).toEqual([]);
  });

  it('when the web app and the reports are scanned then no file but the contracts defines role colours', () => {
    const found = ROOTS.flatMap((root) =>
      files(path.join(REPO, root)).flatMap((f) =>
        ownRoleColours(path.relative(REPO, f), fs.readFileSync(f, 'utf8')),
      ),
    );
    expect(found).toEqual([]);
    // and the contracts do hold them
    const contract = fs.readFileSync(path.join(REPO, 'server/src/contracts/role-code.ts'), 'utf8');
    expect(contract.match(/#[0-9a-f]{6}\b/g)?.length).toBeGreaterThanOrEqual(10);
  });
});
