/**
 * The API's contracts, shared by server, web app and watcher (alias `@equilight/contracts`): the
 * request and response schemas of every route and the route table, the settings with their
 * defaults, the enums with their labels, and the live events. Pure: zod and the analysis module only.
 */
export * from './roles';
export * from './enums';
export * from './role-code';
export * from './common';
export * from './settings';
export * from './analysis-types';
export * from './email-address';
export * from './users';
export * from './auth';
export * from './instruments';
export * from './intake';
export * from './layouts';
export * from './manifests';
export * from './batches';
export * from './comments';
export * from './audit';
export * from './mail';
export * from './temperatures';
export * from './webhooks';
export * from './overview';
export * from './watchers';
export * from './events';
export * from './route-access';
// The route table (every schema of every route, for the OpenAPI document) is imported by path where it is
// needed: re-exported here, it would put all of the API's schemas into the browser's first script.
