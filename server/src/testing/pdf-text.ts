import zlib from 'node:zlib';

/**
 * The text of a PDF as written by pdfkit (embedded fonts with ToUnicode maps; streams plain or
 * deflated), one line per text line. Enough to check what a report says; not a general PDF reader.
 */
export function extractPdfText(pdf: Buffer): string {
  const source = pdf.toString('latin1');
  const objects = new Map<number, { dict: string; stream: Buffer | null }>();
  const objectPattern = /(\d+) 0 obj\s*([\s\S]*?)endobj/g;
  for (let m = objectPattern.exec(source); m; m = objectPattern.exec(source)) {
    const body = m[2];
    const streamAt = body.indexOf('stream');
    if (streamAt < 0) {
      objects.set(Number(m[1]), { dict: body, stream: null });
      continue;
    }
    const dict = body.slice(0, streamAt);
    let start = streamAt + 'stream'.length;
    if (body[start] === '\r') start++;
    if (body[start] === '\n') start++;
    const end = body.lastIndexOf('endstream');
    let data = Buffer.from(body.slice(start, end), 'latin1');
    if (/\/FlateDecode/.test(dict)) data = zlib.inflateSync(data);
    objects.set(Number(m[1]), { dict, stream: data });
  }

  const unicodeMaps = new Map<number, Map<number, string>>();
  const toUnicode = (objectId: number): Map<number, string> => {
    const cached = unicodeMaps.get(objectId);
    if (cached) return cached;
    const map = new Map<number, string>();
    const font = objects.get(objectId);
    const ref = /\/ToUnicode (\d+) 0 R/.exec(font?.dict ?? '');
    const cmap = ref ? (objects.get(Number(ref[1]))?.stream?.toString('latin1') ?? '') : '';
    const hex = (h: string): string =>
      String.fromCodePoint(...(h.replace(/\s+/g, '').match(/.{4}/g) ?? []).map((x) => parseInt(x, 16)));
    for (const block of cmap.matchAll(/beginbfrange([\s\S]*?)endbfrange/g)) {
      for (const line of block[1].matchAll(
        /<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]+)>\s*(\[[^\]]*\]|<[0-9a-fA-F\s]+>)/g,
      )) {
        const lo = parseInt(line[1], 16);
        const hi = parseInt(line[2], 16);
        if (line[3].startsWith('[')) {
          const targets = [...line[3].matchAll(/<([0-9a-fA-F\s]+)>/g)].map((t) => hex(t[1]));
          targets.forEach((t, i) => map.set(lo + i, t));
        } else {
          const base = parseInt(line[3].slice(1, -1), 16);
          for (let code = lo; code <= hi; code++) map.set(code, String.fromCodePoint(base + code - lo));
        }
      }
    }
    for (const block of cmap.matchAll(/beginbfchar([\s\S]*?)endbfchar/g)) {
      for (const line of block[1].matchAll(/<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]+)>/g))
        map.set(parseInt(line[1], 16), hex(line[2]));
    }
    unicodeMaps.set(objectId, map);
    return map;
  };

  const lines: string[] = [];
  for (const page of objects.values()) {
    if (!/\/Type \/Page\b/.test(page.dict)) continue;
    const fontNames = new Map<string, number>();
    const resourcesRef = /\/Resources (\d+) 0 R/.exec(page.dict);
    const resources = resourcesRef ? (objects.get(Number(resourcesRef[1]))?.dict ?? '') : page.dict;
    const fontDict = /\/Font\s*<<([\s\S]*?)>>/.exec(resources)?.[1] ?? '';
    for (const f of fontDict.matchAll(/\/(\S+) (\d+) 0 R/g)) fontNames.set(f[1], Number(f[2]));
    const contents = [
      ...(/\/Contents (\[[^\]]*\]|\d+ 0 R)/.exec(page.dict)?.[1] ?? '').matchAll(/(\d+) 0 R/g),
    ];
    for (const ref of contents) {
      const stream = objects.get(Number(ref[1]))?.stream?.toString('latin1') ?? '';
      let map = new Map<number, string>();
      let lastY: string | null = null;
      let line = '';
      let size = 10;
      // Where the previous fragment of the line roughly ended (glyph widths are not read: ~0.6 em each).
      let endX = 0;
      let fragment = '';
      const ops =
        /\/(\S+) ([\d.]+) Tf|[\d.-]+ [\d.-]+ [\d.-]+ [\d.-]+ ([\d.-]+) ([\d.-]+) Tm|\[((?:<[0-9a-fA-F]*>|\s|-?[\d.]+)*)\] TJ/g;
      for (let op = ops.exec(stream); op; op = ops.exec(stream)) {
        if (op[1]) {
          map = toUnicode(fontNames.get(op[1]) ?? -1);
          size = Number(op[2]);
        } else if (op[4] !== undefined) {
          const x = Number(op[3]);
          if (lastY !== null && op[4] !== lastY) {
            lines.push(line);
            line = '';
          } else if (lastY !== null && x > endX + size) {
            line += '\t';
          }
          lastY = op[4];
          endX = x;
          fragment = '';
        } else if (op[5] !== undefined) {
          for (const part of op[5].matchAll(/<([0-9a-fA-F]*)>|(-?[\d.]+)/g)) {
            if (part[1] !== undefined)
              for (const code of part[1].match(/.{4}/g) ?? []) fragment += map.get(parseInt(code, 16)) ?? '';
            else if (Number(part[2]) < -250) fragment += ' ';
          }
          line += fragment;
          endX += [...fragment].length * size * 0.6;
          fragment = '';
        }
      }
      if (line) lines.push(line);
    }
  }
  return lines.map((l) => l.replace(/\0/g, '')).join('\n');
}
