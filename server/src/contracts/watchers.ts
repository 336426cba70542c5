import { z } from 'zod';

export const createWatcherSchema = z.strictObject({
  name: z.string().trim().min(1, 'is required').max(80),
});

/** A watcher's report: its version, its computer and the drop sub-folders it watches now. */
export const heartbeatSchema = z.strictObject({
  version: z.string().trim().min(1).max(40),
  hostname: z.string().trim().max(120).optional(),
  folders: z.array(z.string().regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$/)).max(500),
});
