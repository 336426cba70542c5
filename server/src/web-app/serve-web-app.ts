import fs from 'node:fs';
import path from 'node:path';
import type { Express } from 'express';
import expressStaticGzip from 'express-static-gzip';

/** Angular's build names its output `name-HASH.ext` (8 base-32 characters); the compressed copies add .br/.gz. */
const HASHED_FILE = /-[A-Z0-9]{8}\.[a-z0-9]+(\.br|\.gz)?$/;

/** A hashed file never changes under its name, so it is kept a year; anything else is asked again each time. */
export function cacheControlFor(filePath: string): string {
  return HASHED_FILE.test(path.basename(filePath)) ? 'public, max-age=31536000, immutable' : 'no-cache';
}

/**
 * Serve the built Angular app: the brotli or gzip copy written at build time (scripts/compress-web.mjs)
 * when the browser accepts it, with Vary: Accept-Encoding; and index.html for any client route.
 */
export function serveWebApp(app: Express, webDistDir: string): void {
  const indexFile = path.join(webDistDir, 'index.html');
  app.use(
    expressStaticGzip(webDistDir, {
      enableBrotli: true,
      orderPreference: ['br', 'gzip'],
      index: false,
      serveStatic: {
        index: false,
        cacheControl: false,
        setHeaders: (res, filePath) => res.setHeader('Cache-Control', cacheControlFor(filePath)),
      },
    }),
  );
  app.get('/{*any}', (_req, res, next) => {
    if (!fs.existsSync(indexFile)) return next();
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
