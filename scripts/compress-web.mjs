// After ng build: preloads the fonts every page needs, marks the app's scripts for eager compilation,
// then writes a brotli (.br) and a gzip (.gz) copy beside each text file of dist/web/browser, which the
// server sends when the browser accepts it (server/src/web-app/serve-web-app.ts). Compressing once at
// build time allows the slowest, smallest settings (brotli quality 11, gzip level 9) that would cost too
// much per request.
// Usage: node scripts/compress-web.mjs [dist/web/browser]   (run by npm run build:web)
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import zlib from 'node:zlib';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dir = path.resolve(root, process.argv[2] ?? 'dist/web/browser');
const COMPRESSIBLE = /\.(js|mjs|css|html|svg|json|txt|map|xml|ico|webmanifest)$/;
const MIN_BYTES = 512;
/** Fonts on every page: body text, buttons and headings (Latin 400 and 500) and the icons. */
const PRELOAD_FONTS = [
  /^noto-sans-latin-400-normal-[A-Z0-9]+\.woff2$/,
  /^noto-sans-latin-500-normal-[A-Z0-9]+\.woff2$/,
  /^material-symbols-outlined-[A-Z0-9]+\.woff2$/,
];

function preloadFonts() {
  const indexFile = path.join(dir, 'index.html');
  let html = fs.readFileSync(indexFile, 'utf8');
  if (html.includes('rel="preload" as="font"')) return 0;
  const media = fs.existsSync(path.join(dir, 'media')) ? fs.readdirSync(path.join(dir, 'media')) : [];
  const links = PRELOAD_FONTS.map((pattern) => {
    const file = media.find((name) => pattern.test(name));
    if (!file)
      throw new Error(`No built font matches ${pattern}: did the fonts in web/src/fonts.scss change?`);
    return `<link rel="preload" as="font" type="font/woff2" href="media/${file}" crossorigin>`;
  });
  html = html.replace('</head>', `${links.join('')}</head>`);
  fs.writeFileSync(indexFile, html);
  return links.length;
}

/**
 * V8's explicit compile hint, first line of a script: compile all its functions while the script streams
 * in, on a background thread, instead of each one on the page's main thread the first time it runs. A
 * script loaded is one the page is about to run (the app splits by page), so little is compiled for
 * nothing; on a cold batch page this took the tasks over 50 ms of wall time from 20–21 to 6–11 over six
 * interleaved loads on a 2-core machine (K no later). Browsers without the hint read a comment.
 */
const COMPILE_HINT = '//# allFunctionsCalledOnLoad\n';
const APP_SCRIPT = /^(main|chunk)-[A-Za-z0-9_-]+\.js$/;

function addCompileHints() {
  let count = 0;
  for (const name of fs.readdirSync(dir)) {
    if (!APP_SCRIPT.test(name)) continue;
    const file = path.join(dir, name);
    const code = fs.readFileSync(file, 'utf8');
    if (code.startsWith(COMPILE_HINT)) continue;
    fs.writeFileSync(file, COMPILE_HINT + code);
    count++;
  }
  return count;
}

function filesUnder(d) {
  return fs.readdirSync(d, { withFileTypes: true }).flatMap((e) => {
    const full = path.join(d, e.name);
    return e.isDirectory() ? filesUnder(full) : [full];
  });
}

function compressAll() {
  let raw = 0;
  let br = 0;
  let gz = 0;
  let count = 0;
  for (const file of filesUnder(dir)) {
    if (!COMPRESSIBLE.test(file)) continue;
    const content = fs.readFileSync(file);
    if (content.length < MIN_BYTES) continue;
    const brotli = zlib.brotliCompressSync(content, {
      params: {
        [zlib.constants.BROTLI_PARAM_QUALITY]: zlib.constants.BROTLI_MAX_QUALITY,
        [zlib.constants.BROTLI_PARAM_MODE]: zlib.constants.BROTLI_MODE_TEXT,
        [zlib.constants.BROTLI_PARAM_SIZE_HINT]: content.length,
      },
    });
    const gzip = zlib.gzipSync(content, { level: zlib.constants.Z_BEST_COMPRESSION });
    fs.writeFileSync(`${file}.br`, brotli);
    fs.writeFileSync(`${file}.gz`, gzip);
    raw += content.length;
    br += brotli.length;
    gz += gzip.length;
    count++;
  }
  return { count, raw, br, gz };
}

const started = Date.now();
const preloads = preloadFonts();
const hinted = addCompileHints();
const { count, raw, br, gz } = compressAll();
const kb = (n) => `${(n / 1024).toFixed(0)} kB`;
console.log(
  `compress-web: ${preloads} font preloads; ${hinted} scripts hinted for eager compilation; ${count} files ${kb(raw)} → brotli ${kb(br)}, gzip ${kb(gz)} in ${Date.now() - started} ms`,
);
