import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { dropFolderNameSchema, fileFormatSchema, instrumentKindSchema, intakeStatusSchema } from './enums';

export const createWatcherSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    name: z.string().trim().min(1, 'is required').max(80),
  }),
);

/** A watcher's report: its version, its computer and the drop sub-folders it watches now. */
export const heartbeatSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    version: z.string().trim().min(1).max(40),
    hostname: z.string().trim().max(120).optional(),
    folders: z.array(dropFolderNameSchema).max(500),
  }),
);

/** A watcher credential as admins see it (never the token). */
export const watcherCredentialSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    tokenPrefix: z.string(),
    createdAt: z.string(),
    revokedAt: z.string().nullable(),
    lastSeenAt: z.string().nullable(),
    version: z.string().nullable(),
    hostname: z.string().nullable(),
    folders: z.array(z.string()),
  }),
);
export type WatcherCredentialDto = z.infer<typeof watcherCredentialSchema>;

/** POST /api/watchers: the new credential and its token, shown once. */
export const createdWatcherSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ watcher: watcherCredentialSchema, token: z.string() }),
);

/** Per instrument profile: the last watcher report for its drop folder. */
export const presenceSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    profileId: z.number(),
    watcherName: z.string(),
    version: z.string().nullable(),
    hostname: z.string().nullable(),
    lastSeenAt: z.string(),
    /** No report for longer than INSTRUMENT_SILENT_MINUTES. */
    silent: z.boolean(),
  }),
);
export type PresenceDto = z.infer<typeof presenceSchema>;

/** What a watcher with a credential watches: the active profiles' drop folders and how their files are named. */
export const watchedFoldersSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    /** Changes whenever a folder is added, removed or its rules change; the watcher reloads on a new value. */
    revision: z.string(),
    folders: z.array(
      z.object({
        profileId: z.number(),
        name: z.string(),
        folder: dropFolderNameSchema,
        kind: instrumentKindSchema,
        fileFormat: fileFormatSchema,
        fileNamePattern: z.string().nullable(),
      }),
    ),
  }),
);
export type WatchedFolders = z.infer<typeof watchedFoldersSchema>;

/** POST /api/watcher/heartbeat: the profiles the report covers. */
export const heartbeatAnswerSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ profiles: z.array(z.number()) }),
);

/** A sent file's state, for the watcher. */
export const fileStatusSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    status: intakeStatusSchema,
    /** Why a quarantined file was set aside. */
    error: z.string().nullable(),
    duplicateOfId: z.number().nullable(),
  }),
);
export type FileStatusDto = z.infer<typeof fileStatusSchema>;
