import fs from 'node:fs';
import path from 'node:path';
import type { Express } from 'express';
import expressStaticGzip from 'express-static-gzip';

/**
 * The build names its scripts, styles and fonts `name-HASH.ext` with 8 hash characters (base 32 from
 * esbuild, base 64 URL-safe where chunks are merged); the compressed copies add .br/.gz.
 */
const HASHED_FILE = /-[A-Za-z0-9_-]{8}\.(?:js|mjs|css|woff2?|ttf)(?:\.br|\.gz)?$/;

/** A path that names a file of the build (its last segment has an extension); client routes have none. */
const BUILD_FILE = /\/[^/]*\.[A-Za-z0-9]{1,8}$/;

/** A hashed file never changes under its name, so it is kept a year; anything else is asked again each time. */
export function cacheControlFor(filePath: string): string {
  return HASHED_FILE.test(path.basename(filePath)) ? 'public, max-age=31536000, immutable' : 'no-cache';
}

/**
 * Serve the built Angular app: the brotli or gzip copy written at build time (scripts/compress-web.mjs)
 * when the browser accepts it, with Vary: Accept-Encoding; index.html for any client route; a 404 for a
 * file of the build that is not there.
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
  app.get('/{*any}', (req, res, next) => {
    if (!fs.existsSync(indexFile)) return next();
    // A file of the build that is not there (a script an open tab asks for after a new build replaced it)
    // is a 404, not the index page: a script answered with HTML fails in the browser with no clear cause.
    if (BUILD_FILE.test(req.path)) {
      res.setHeader('Cache-Control', 'no-cache');
      res
        .status(404)
        .type('text/plain')
        .send(`No such file in this build: ${path.posix.basename(req.path)}`);
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
