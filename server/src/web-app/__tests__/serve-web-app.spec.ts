import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { cacheControlFor } from '../serve-web-app';

// A small built app in a temporary folder, compressed by the real build step (scripts/compress-web.mjs),
// served by the real app. Bodies are decoded with Node's own zlib, not by the HTTP client.
const REPO_ROOT = path.resolve(__dirname, '../../../..');
const CHUNK = 'chunk-ABCD2345.js';
const chunkSource = `export const plate = ${JSON.stringify(
  Array.from({ length: 400 }, (_, i) => ({ position: `C${i + 1}`, absorbance: (i % 37) / 40 })),
)};\n`;
/** The chunk as the build step leaves it: V8's compile hint on its first line, then the code. */
const builtChunk = `//# allFunctionsCalledOnLoad\n${chunkSource}`;

interface RawResponse {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: Buffer;
}

/** A plain Node request: the bytes as they came over the wire, not decoded by an HTTP client. */
function get(base: string, urlPath: string, acceptEncoding: string): Promise<RawResponse> {
  return new Promise((resolve, reject) => {
    http
      .get(`${base}${urlPath}`, { headers: { 'accept-encoding': acceptEncoding } }, (res) => {
        const parts: Buffer[] = [];
        res.on('data', (d: Buffer) => parts.push(d));
        res.on('end', () =>
          resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(parts) }),
        );
      })
      .on('error', reject);
  });
}

describe('serving the built web app', () => {
  let dist: string;
  let t: TestApp;
  let server: http.Server;
  let base: string;

  beforeAll(async () => {
    dist = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-web-dist-'));
    fs.mkdirSync(path.join(dist, 'media'));
    fs.writeFileSync(
      path.join(dist, 'index.html'),
      `<!doctype html><html><head><title>Equilight</title></head><body><eq-root></eq-root><script src="${CHUNK}" type="module"></script></body></html>\n`,
    );
    fs.writeFileSync(path.join(dist, CHUNK), chunkSource);
    fs.writeFileSync(
      path.join(dist, 'favicon.svg'),
      `<svg xmlns="http://www.w3.org/2000/svg">${' '.repeat(600)}</svg>`,
    );
    for (const font of [
      'noto-sans-latin-400-normal-AAAA1111.woff2',
      'noto-sans-latin-500-normal-BBBB2222.woff2',
      'material-symbols-outlined-CCCC3333.woff2',
    ])
      fs.writeFileSync(path.join(dist, 'media', font), 'wOF2');
    execFileSync(process.execPath, [path.join(REPO_ROOT, 'scripts/compress-web.mjs'), dist], {
      stdio: 'pipe',
    });
    t = await startTestApp({ WEB_DIST_DIR: dist });
    server = http.createServer(t.app);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });

  afterAll(async () => {
    await new Promise((resolve) => server.close(resolve));
    await t.stop();
    fs.rmSync(dist, { recursive: true, force: true });
  });

  it('when the build step ran, then each text file has a brotli and a gzip copy and index.html preloads the fonts', () => {
    expect(zlib.brotliDecompressSync(fs.readFileSync(path.join(dist, `${CHUNK}.br`))).toString()).toBe(
      builtChunk,
    );
    expect(zlib.gunzipSync(fs.readFileSync(path.join(dist, `${CHUNK}.gz`))).toString()).toBe(builtChunk);
    // Hinted once: a second run of the build step leaves the script as it is.
    expect(fs.readFileSync(path.join(dist, CHUNK), 'utf8')).toBe(builtChunk);
    execFileSync(process.execPath, [path.join(REPO_ROOT, 'scripts/compress-web.mjs'), dist], {
      stdio: 'pipe',
    });
    expect(fs.readFileSync(path.join(dist, CHUNK), 'utf8')).toBe(builtChunk);
    const html = fs.readFileSync(path.join(dist, 'index.html'), 'utf8');
    expect(html.match(/rel="preload" as="font"/g)).toHaveLength(3);
    expect(html).toContain('href="media/material-symbols-outlined-CCCC3333.woff2" crossorigin');
  });

  it('when the browser accepts brotli, then a script comes brotli-compressed, cached a year, with Vary', async () => {
    const res = await get(base, `/${CHUNK}`, 'gzip, deflate, br');
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('br');
    expect(res.headers['content-type']).toMatch(/^text\/javascript|^application\/javascript/);
    expect(res.headers['vary']).toMatch(/Accept-Encoding/i);
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(res.body.length).toBeLessThan(builtChunk.length / 3);
    expect(zlib.brotliDecompressSync(res.body).toString()).toBe(builtChunk);
  });

  it('when the browser accepts only gzip, then it gets gzip; with no encoding, the plain file', async () => {
    const gz = await get(base, `/${CHUNK}`, 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(gz.body).toString()).toBe(builtChunk);

    const plain = await get(base, `/${CHUNK}`, 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.headers['vary']).toMatch(/Accept-Encoding/i);
    expect(plain.body.toString()).toBe(builtChunk);
  });

  it('when a page of the app is asked for, then index.html comes and is revalidated every time', async () => {
    for (const url of ['/', '/batches/7']) {
      const res = await request(t.app).get(url);
      expect(res.status).toBe(200);
      expect(res.headers['cache-control']).toBe('no-cache');
      expect(res.text).toContain('<eq-root>');
    }
    const icon = await request(t.app).get('/favicon.svg').set('Accept-Encoding', 'br');
    expect(icon.headers['cache-control']).toBe('no-cache');
  });

  it('when a script of an earlier build is asked for, then it is a 404, not the index page', async () => {
    for (const url of ['/chunk-ZZZZ9999.js', '/media/gone-AAAA0000.woff2', '/styles-QQQQ1111.css']) {
      const res = await request(t.app).get(url).set('Accept', '*/*');
      expect(res.status).toBe(404);
      expect(res.headers['content-type']).toMatch(/^text\/plain/);
      expect(res.text).not.toContain('<eq-root>');
    }
    // A client route with a dot inside a segment, not at its end, is still a page.
    const page = await request(t.app).get('/batches/7/x.y/z');
    expect(page.text).toContain('<eq-root>');
  });

  it('when an API answer is large JSON, then it goes out compressed', async () => {
    const res = await get(base, '/api/openapi.json', 'gzip');
    expect(res.headers['content-encoding']).toBe('gzip');
    const doc = JSON.parse(zlib.gunzipSync(res.body).toString()) as { openapi: string };
    expect(doc.openapi).toMatch(/^3\./);
  });

  it('tells hashed build output from files that may change under their name', () => {
    expect(cacheControlFor('/dist/main-LRXLZWXJ.js')).toContain('immutable');
    expect(cacheControlFor('/dist/media/noto-sans-latin-400-normal-DUBPJEHV.woff2')).toContain('immutable');
    expect(cacheControlFor('/dist/chunk-EILUMGVL.js.br')).toContain('immutable');
    expect(cacheControlFor('/dist/chunk-C0YipGyv.js')).toContain('immutable');
    expect(cacheControlFor('/dist/chunk-Co7oOVk_.js.gz')).toContain('immutable');
    expect(cacheControlFor('/dist/worker-DVFLHFE6.js')).toContain('immutable');
    expect(cacheControlFor('/dist/index.html')).toBe('no-cache');
    expect(cacheControlFor('/dist/favicon.svg')).toBe('no-cache');
    expect(cacheControlFor('/dist/3rdpartylicenses.txt')).toBe('no-cache');
    expect(cacheControlFor('/dist/plate-template-download.csv')).toBe('no-cache');
  });
});
