import type { z } from 'zod';
import { auditQuerySchema } from '../audit/audit.schema';
import { loginSchema, setPasswordSchema } from '../auth/auth.schema';
import {
  analysisQuerySchema,
  approveSchema,
  assignSchema,
  createBatchSchema,
  reasonSchema,
  updateSettingsSchema,
} from '../batches/batches.schema';
import { intakeQuerySchema } from '../ingest/intake.schema';
import { createProfileSchema, updateProfileSchema } from '../instruments/instruments.schema';
import { createLayoutSchema, updateLayoutSchema } from '../layouts/layouts.schema';
import { forgotPasswordSchema, notificationSettingsSchema, outboxQuerySchema } from '../mail/mail.schema';
import { manifestMetaSchema } from '../manifests/manifests.schema';
import { temperaturesQuerySchema } from '../temperatures/temperatures.router';
import { createUserSchema, updateUserSchema } from '../users/users.schema';
import type { Role } from '../users/user.entity';

export type Access = 'public' | 'instrument' | readonly Role[];

export interface ApiOperation {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** OpenAPI path template, e.g. /api/batches/{id}. */
  path: string;
  tag: string;
  summary: string;
  access: Access;
  /** The zod schema the route validates its JSON body with. */
  body?: z.ZodType;
  /** A multipart form with a file field, and the schema of its other fields if any. */
  multipart?: { fields?: z.ZodType; fileTypes: string };
  query?: z.ZodType;
  /** Success status and what it returns. */
  success: [status: number, description: string];
}

const ALL: readonly Role[] = ['admin', 'lab_manager', 'scientist'];
const MANAGERS: readonly Role[] = ['admin', 'lab_manager'];
const ADMIN: readonly Role[] = ['admin'];

/**
 * Every API operation, with the same zod schemas the routes validate with. The OpenAPI document is
 * generated from this list; a test checks that each entry is a mounted route.
 */
export const API_OPERATIONS: readonly ApiOperation[] = [
  {
    method: 'get',
    path: '/api/health',
    tag: 'system',
    summary:
      'Health: touches the database; status ok, or degraded with reasons (503 when the database does not answer)',
    access: 'public',
    success: [200, 'The server is up: {status: ok} or {status: degraded, reasons: [...]}'],
  },
  {
    method: 'post',
    path: '/api/auth/login',
    tag: 'auth',
    summary: 'Sign in with e-mail and password',
    access: 'public',
    body: loginSchema,
    success: [200, 'The signed-in person'],
  },
  {
    method: 'post',
    path: '/api/auth/logout',
    tag: 'auth',
    summary: 'Sign out',
    access: 'public',
    success: [204, 'Signed out'],
  },
  {
    method: 'get',
    path: '/api/auth/me',
    tag: 'auth',
    summary: 'Who is signed in',
    access: ALL,
    success: [200, 'The signed-in person'],
  },
  {
    method: 'post',
    path: '/api/auth/set-password',
    tag: 'auth',
    summary: 'Set a password with a one-time link token',
    access: 'public',
    body: setPasswordSchema,
    success: [200, 'The person'],
  },
  {
    method: 'get',
    path: '/api/users',
    tag: 'people',
    summary: 'List people',
    access: ADMIN,
    success: [200, 'People'],
  },
  {
    method: 'post',
    path: '/api/users',
    tag: 'people',
    summary: 'Add a person (with a password, or invited by a one-time link)',
    access: ADMIN,
    body: createUserSchema,
    success: [201, 'The person and, for an invitation, the set-password link'],
  },
  {
    method: 'patch',
    path: '/api/users/{id}',
    tag: 'people',
    summary: 'Change name, role or active flag',
    access: ADMIN,
    body: updateUserSchema,
    success: [200, 'The person'],
  },
  {
    method: 'get',
    path: '/api/instruments',
    tag: 'instruments',
    summary: 'List instrument profiles',
    access: ADMIN,
    success: [200, 'Profiles (tokens are never listed)'],
  },
  {
    method: 'get',
    path: '/api/instruments/summary',
    tag: 'instruments',
    summary: 'Instrument names and formats',
    access: ALL,
    success: [200, 'id, name, kind, plateFormat, active'],
  },
  {
    method: 'post',
    path: '/api/instruments',
    tag: 'instruments',
    summary: 'Create a profile and its token (shown once)',
    access: ADMIN,
    body: createProfileSchema,
    success: [201, 'The profile and its token'],
  },
  {
    method: 'patch',
    path: '/api/instruments/{id}',
    tag: 'instruments',
    summary: 'Change a profile',
    access: ADMIN,
    body: updateProfileSchema,
    success: [200, 'The profile'],
  },
  {
    method: 'post',
    path: '/api/instruments/{id}/token',
    tag: 'instruments',
    summary: 'Issue a new token (the old one stops working)',
    access: ADMIN,
    success: [200, 'The profile and its new token'],
  },
  {
    method: 'delete',
    path: '/api/instruments/{id}/token',
    tag: 'instruments',
    summary: 'Revoke the token',
    access: ADMIN,
    success: [200, 'The profile'],
  },
  {
    method: 'post',
    path: '/api/instruments/try',
    tag: 'instruments',
    summary: 'Parse a sample file with given rules, saving nothing',
    access: ADMIN,
    multipart: { fileTypes: '.csv .tsv .txt .dat; field "rules" = JSON parsing rules' },
    success: [
      200,
      'Reading count, first readings, metadata, warnings (422 with line and column on a parse error)',
    ],
  },
  {
    method: 'post',
    path: '/api/ingest',
    tag: 'intake',
    summary: 'Send an instrument export (Bearer instrument token, or a signed-in upload with profileId)',
    access: 'instrument',
    multipart: { fileTypes: '.csv .tsv .txt .dat' },
    success: [202, 'Receipt: intake id, queued or duplicate'],
  },
  {
    method: 'get',
    path: '/api/intake',
    tag: 'intake',
    summary: 'Received files with their states',
    access: MANAGERS,
    query: intakeQuerySchema,
    success: [200, 'A page of files and the total'],
  },
  {
    method: 'get',
    path: '/api/intake/{id}',
    tag: 'intake',
    summary: 'One received file',
    access: MANAGERS,
    success: [200, 'The file'],
  },
  {
    method: 'post',
    path: '/api/intake/{id}/requeue',
    tag: 'intake',
    summary: 'Queue a quarantined file again',
    access: MANAGERS,
    success: [202, 'The file'],
  },
  {
    method: 'post',
    path: '/api/intake/{id}/assign',
    tag: 'intake',
    summary: 'Put an unassigned file into a batch',
    access: MANAGERS,
    body: assignSchema,
    success: [200, 'The file'],
  },
  {
    method: 'get',
    path: '/api/layouts',
    tag: 'layouts',
    summary: 'List layouts',
    access: ALL,
    success: [200, 'Layouts'],
  },
  {
    method: 'get',
    path: '/api/layouts/{id}',
    tag: 'layouts',
    summary: 'A layout at its current version',
    access: ALL,
    success: [200, 'The layout'],
  },
  {
    method: 'get',
    path: '/api/layouts/{id}/versions/{version}',
    tag: 'layouts',
    summary: 'A layout at a version',
    access: ALL,
    success: [200, 'The layout'],
  },
  {
    method: 'post',
    path: '/api/layouts',
    tag: 'layouts',
    summary: 'Create a layout',
    access: MANAGERS,
    body: createLayoutSchema,
    success: [201, 'The layout'],
  },
  {
    method: 'put',
    path: '/api/layouts/{id}',
    tag: 'layouts',
    summary: 'Save a new version of a layout',
    access: MANAGERS,
    body: updateLayoutSchema,
    success: [200, 'The layout'],
  },
  {
    method: 'get',
    path: '/api/manifests',
    tag: 'manifests',
    summary: 'List manifests',
    access: ALL,
    success: [200, 'Manifests'],
  },
  {
    method: 'get',
    path: '/api/manifests/{id}',
    tag: 'manifests',
    summary: 'A manifest at its current version',
    access: ALL,
    success: [200, 'The manifest'],
  },
  {
    method: 'get',
    path: '/api/manifests/{id}/versions/{version}',
    tag: 'manifests',
    summary: 'A manifest at a version',
    access: ALL,
    success: [200, 'The manifest'],
  },
  {
    method: 'post',
    path: '/api/manifests/check',
    tag: 'manifests',
    summary: 'Check a manifest (file or rows) against a layout, saving nothing',
    access: MANAGERS,
    body: manifestMetaSchema,
    multipart: { fields: manifestMetaSchema, fileTypes: '.csv .tsv .txt .xlsx' },
    success: [200, 'Samples, every problem with row and column, and mismatches with the layout'],
  },
  {
    method: 'post',
    path: '/api/manifests',
    tag: 'manifests',
    summary: 'Save a manifest',
    access: MANAGERS,
    body: manifestMetaSchema,
    multipart: { fields: manifestMetaSchema, fileTypes: '.csv .tsv .txt .xlsx' },
    success: [201, 'The manifest'],
  },
  {
    method: 'put',
    path: '/api/manifests/{id}',
    tag: 'manifests',
    summary: 'Save a new version of a manifest',
    access: MANAGERS,
    body: manifestMetaSchema,
    multipart: { fields: manifestMetaSchema, fileTypes: '.csv .tsv .txt .xlsx' },
    success: [200, 'The manifest'],
  },
  {
    method: 'get',
    path: '/api/batches',
    tag: 'batches',
    summary: 'List batches',
    access: ALL,
    success: [200, 'Batches'],
  },
  {
    method: 'post',
    path: '/api/batches',
    tag: 'batches',
    summary: 'Create a batch waiting for the files of a run',
    access: MANAGERS,
    body: createBatchSchema,
    success: [201, 'The batch'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}',
    tag: 'batches',
    summary: 'One batch',
    access: ALL,
    success: [200, 'The batch'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/analysis',
    tag: 'batches',
    summary:
      "Inputs and results of the analysis of a batch; an approved batch answers from its approval record (engineCheck=true adds what today's engine gives)",
    access: ALL,
    query: analysisQuerySchema,
    success: [
      200,
      'Readings, samples, settings, the analysis result and, when approved, its approval record',
    ],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/results',
    tag: 'batches',
    summary: 'Approval records of a batch, newest first (one per approval; a reopening keeps the old one)',
    access: ALL,
    success: [200, 'Approval records without their full results'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/results/{recordId}',
    tag: 'batches',
    summary: 'One approval record: engine version, settings, input file hashes and the full stored result',
    access: ALL,
    success: [200, 'The approval record'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/epsilon-sources',
    tag: 'batches',
    summary:
      'Batches that can lend ε of the complex: same chemical system, wavelength within ±1 nm, with a calibration',
    access: ALL,
    success: [200, 'Candidate batches with their ε and the record it comes from'],
  },
  {
    method: 'put',
    path: '/api/batches/{id}/settings',
    tag: 'batches',
    summary: 'Change analysis settings or exclusions (with a reason)',
    access: ['lab_manager', 'scientist'],
    body: updateSettingsSchema,
    success: [200, 'The batch'],
  },
  {
    method: 'post',
    path: '/api/batches/{id}/review',
    tag: 'batches',
    summary: 'Mark a batch reviewed',
    access: ['lab_manager', 'scientist'],
    success: [200, 'The batch'],
  },
  {
    method: 'post',
    path: '/api/batches/{id}/approve',
    tag: 'batches',
    summary:
      'Approve a reviewed batch (comment required): stores its approval record; with four-eyes approval the approver did not create or review it (403 four_eyes)',
    access: ['lab_manager'],
    body: approveSchema,
    success: [200, 'The batch'],
  },
  {
    method: 'post',
    path: '/api/batches/{id}/reopen',
    tag: 'batches',
    summary: 'Reopen a reviewed or approved batch (reason required)',
    access: ['lab_manager'],
    body: reasonSchema,
    success: [200, 'The batch'],
  },
  {
    method: 'get',
    path: '/api/audit',
    tag: 'audit',
    summary: 'The audit trail (read-only)',
    access: MANAGERS,
    query: auditQuerySchema,
    success: [200, 'A page of entries and the total'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/export.csv',
    tag: 'reports',
    summary: 'CSV export of readings or results (content=readings|results); formula-like text is escaped',
    access: ALL,
    success: [200, 'text/csv attachment'],
  },
  {
    method: 'get',
    path: '/api/batches/{id}/report.pdf',
    tag: 'reports',
    summary:
      'PDF report: metadata, layout map, calibration plot, tables, verdict, QC flags, file hashes, review trail',
    access: ALL,
    success: [200, 'application/pdf'],
  },
  {
    method: 'post',
    path: '/api/auth/forgot-password',
    tag: 'auth',
    summary: 'Mail a one-time link to set a new password (never says whether the e-mail exists)',
    access: 'public',
    body: forgotPasswordSchema,
    success: [202, 'Accepted'],
  },
  {
    method: 'get',
    path: '/api/me/notifications',
    tag: 'mail',
    summary: 'My notification settings',
    access: ALL,
    success: [200, 'batchComplete, qcFailure, batchApproved'],
  },
  {
    method: 'put',
    path: '/api/me/notifications',
    tag: 'mail',
    summary: 'Change my notification settings',
    access: ALL,
    body: notificationSettingsSchema,
    success: [200, 'The settings'],
  },
  {
    method: 'get',
    path: '/api/outbox/status',
    tag: 'mail',
    summary: 'Whether the built-in SMTP stand-in runs',
    access: ALL,
    success: [200, '{ standIn }'],
  },
  {
    method: 'get',
    path: '/api/outbox',
    tag: 'mail',
    summary: 'Mails received by the SMTP stand-in (404 when it does not run)',
    access: ADMIN,
    query: outboxQuerySchema,
    success: [200, 'A page of messages and the total'],
  },
  {
    method: 'get',
    path: '/api/outbox/{id}',
    tag: 'mail',
    summary: 'One received mail',
    access: ADMIN,
    success: [200, 'The message'],
  },
  {
    method: 'get',
    path: '/api/temperatures',
    tag: 'temperatures',
    summary: "K per temperature and the van 't Hoff fit for each chemical system",
    access: ALL,
    query: temperaturesQuerySchema,
    success: [200, 'Systems with their points and fit'],
  },
  {
    method: 'get',
    path: '/api/openapi.json',
    tag: 'system',
    summary: 'This document',
    access: 'public',
    success: [200, 'OpenAPI 3 document'],
  },
];
