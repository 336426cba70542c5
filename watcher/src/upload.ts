import fs from 'node:fs';
import path from 'node:path';
import * as z from 'zod';
import { ingestReceiptSchema } from '../../server/src/contracts/intake';
import { retryAfterMs } from './backoff';

/** What the server's answer means for the file. */
export type UploadResult =
  /** 202: the server has the bytes (queued, or recognised as a duplicate of earlier content). */
  | { kind: 'acknowledged'; intakeId: number; status: string; duplicateOfId?: number }
  /** 400/413/415/422: this file will never be accepted as it is. */
  | { kind: 'rejected'; httpStatus: number; code: string; message: string }
  /** 401/403: the instrument token is wrong or revoked. */
  | { kind: 'unauthorized'; httpStatus: number; message: string }
  /**
   * Anything else: try again later. `scope` says whether the server as a whole is away or busy
   * (network error, timeout, 408/429/502/503/504) or the failure may be about this file only.
   */
  | { kind: 'retry'; reason: string; scope: 'server' | 'file'; unexpected: boolean; retryAfterMs?: number }
  /** The watcher is stopping. */
  | { kind: 'aborted' };

export interface UploadRequest {
  serverUrl: string;
  token: string;
  /** The spooled bytes. */
  file: string;
  /** Informational file name sent with the part. */
  fileName: string;
  /** Path inside the drop folder, for display on the Intake page. */
  sourcePath: string;
  /** With a watcher credential: the drop sub-folder, which names the instrument profile. */
  folder?: string;
  timeoutMs: number;
  signal: AbortSignal;
}

/** The 202 receipt, as the server's contracts define it. */
const ackSchema = ingestReceiptSchema;
const errorSchema = z.object({ error: z.object({ code: z.string(), message: z.string() }) });

const PERMANENT = new Set([400, 413, 415, 422]);
const SERVER_BUSY = new Set([408, 429, 502, 503, 504]);
const MEDIA_TYPES: Record<string, string> = {
  '.csv': 'text/csv',
  '.tsv': 'text/tab-separated-values',
  '.txt': 'text/plain',
  // JCAMP-DX spectra (the media type in common use).
  '.jdx': 'chemical/x-jcamp-dx',
  '.dx': 'chemical/x-jcamp-dx',
  '.jcamp': 'chemical/x-jcamp-dx',
};

/**
 * POST one spooled file to `/api/ingest` and classify the answer. Throws only when the spooled copy
 * cannot be read (a local problem, not the server's).
 */
export async function uploadFile(req: UploadRequest): Promise<UploadResult> {
  const type = MEDIA_TYPES[path.extname(req.fileName).toLowerCase()] ?? 'application/octet-stream';
  const form = new FormData();
  form.append('sourcePath', req.sourcePath);
  if (req.folder !== undefined) form.append('folder', req.folder);
  form.append('file', await fs.openAsBlob(req.file, { type }), req.fileName);
  const timeout = AbortSignal.timeout(req.timeoutMs);
  let response: Response;
  let body: string;
  try {
    response = await fetch(`${req.serverUrl}/api/ingest`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${req.token}`, Accept: 'application/json' },
      body: form,
      redirect: 'manual',
      signal: AbortSignal.any([req.signal, timeout]),
    });
    body = await response.text();
  } catch (err) {
    if (req.signal.aborted) return { kind: 'aborted' };
    if (timeout.aborted) {
      const reason = `no answer within ${Math.round(req.timeoutMs / 1000)} s`;
      return { kind: 'retry', reason, scope: 'server', unexpected: false };
    }
    return {
      kind: 'retry',
      reason: `server unreachable (${networkReason(err)})`,
      scope: 'server',
      unexpected: false,
    };
  }

  const json = parseJson(body);
  const status = response.status;
  if (status === 202) {
    const ack = ackSchema.safeParse(json);
    if (!ack.success) {
      return {
        kind: 'retry',
        reason: `202 without an intake id in its body (${snippet(body)})`,
        scope: 'file',
        unexpected: true,
      };
    }
    return {
      kind: 'acknowledged',
      intakeId: ack.data.id,
      status: ack.data.status,
      ...(ack.data.duplicateOfId != null ? { duplicateOfId: ack.data.duplicateOfId } : {}),
    };
  }
  const error = errorSchema.safeParse(json);
  const code = error.success ? error.data.error.code : `http_${status}`;
  const message = error.success
    ? error.data.error.message
    : `HTTP ${status} ${response.statusText} ${snippet(body)}`.trim();
  if (PERMANENT.has(status)) return { kind: 'rejected', httpStatus: status, code, message };
  if (status === 401 || status === 403) return { kind: 'unauthorized', httpStatus: status, message };
  const retryAfter = retryAfterMs(response.headers.get('retry-after'));
  return {
    kind: 'retry',
    reason: `server answered ${status} (${message})`,
    scope: SERVER_BUSY.has(status) ? 'server' : 'file',
    unexpected: !(SERVER_BUSY.has(status) || status >= 500),
    ...(retryAfter !== undefined ? { retryAfterMs: retryAfter } : {}),
  };
}

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

function snippet(text: string): string {
  const flat = text.replace(/\s+/g, ' ').trim();
  return flat.length > 160 ? `${flat.slice(0, 160)}…` : flat;
}

function networkReason(err: unknown): string {
  const cause = (err as { cause?: { code?: string; message?: string } }).cause;
  return cause?.code ?? cause?.message ?? (err as Error).message ?? String(err);
}
