import { EVERYONE, rolesOf } from '@equilight/contracts';
import type { Routes } from '@angular/router';
import { roleGuard, signedInGuard } from './core/auth/auth.guards';
import { pagesInNextTask } from './core/routing/in-next-task';

export const routes: Routes = pagesInNextTask([
  {
    path: 'sign-in',
    title: 'Sign in · Equilight',
    loadComponent: () => import('./auth/sign-in/sign-in-page').then((m) => m.SignInPage),
  },
  {
    path: 'forgot-password',
    title: 'Reset your password · Equilight',
    loadComponent: () =>
      import('./auth/forgot-password/forgot-password-page').then((m) => m.ForgotPasswordPage),
  },
  {
    path: 'set-password',
    title: 'Set your password · Equilight',
    loadComponent: () => import('./auth/set-password/set-password-page').then((m) => m.SetPasswordPage),
  },
  {
    path: '',
    canActivate: [signedInGuard],
    loadComponent: () => import('./core/shell/shell').then((m) => m.Shell),
    children: [
      {
        path: '',
        pathMatch: 'full',
        title: 'Overview · Equilight',
        loadComponent: () => import('./home/home-page').then((m) => m.HomePage),
      },
      {
        path: 'not-allowed',
        title: 'Not allowed · Equilight',
        loadComponent: () => import('./core/auth/not-allowed-page').then((m) => m.NotAllowedPage),
      },
      {
        path: 'batches',
        title: 'Batches · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/batches'))],
        loadComponent: () => import('./batches/batches-page').then((m) => m.BatchesPage),
      },
      {
        path: 'batches/new',
        title: 'New batch · Equilight',
        canActivate: [roleGuard(...rolesOf('post', '/api/batches'))],
        loadComponent: () => import('./batches/batch-form-page').then((m) => m.BatchFormPage),
      },
      {
        path: 'batches/:id',
        title: 'Batch · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/batches/{id}'))],
        loadComponent: () => import('./batch-detail/batch-detail-page').then((m) => m.BatchDetailPage),
      },
      {
        path: 'temperatures',
        title: 'Temperatures · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/temperatures'))],
        loadComponent: () => import('./temperatures/temperatures-page').then((m) => m.TemperaturesPage),
      },
      {
        path: 'layouts',
        title: 'Layouts · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/layouts'))],
        loadComponent: () => import('./layouts/layouts-page').then((m) => m.LayoutsPage),
      },
      {
        path: 'layouts/new',
        title: 'New layout · Equilight',
        canActivate: [roleGuard(...rolesOf('post', '/api/layouts'))],
        loadComponent: () => import('./layouts/layout-editor-page').then((m) => m.LayoutEditorPage),
      },
      {
        path: 'layouts/:id',
        title: 'Layout · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/layouts/{id}'))],
        loadComponent: () => import('./layouts/layout-editor-page').then((m) => m.LayoutEditorPage),
      },
      {
        path: 'manifests',
        title: 'Manifests · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/manifests'))],
        loadComponent: () => import('./manifests/manifests-page').then((m) => m.ManifestsPage),
      },
      {
        path: 'manifests/new',
        title: 'New manifest · Equilight',
        canActivate: [roleGuard(...rolesOf('post', '/api/manifests'))],
        loadComponent: () => import('./manifests/manifest-page').then((m) => m.ManifestPage),
      },
      {
        path: 'manifests/:id',
        title: 'Manifest · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/manifests/{id}'))],
        loadComponent: () => import('./manifests/manifest-page').then((m) => m.ManifestPage),
      },
      {
        path: 'planner',
        title: 'Planner · Equilight',
        canActivate: [roleGuard(...EVERYONE)],
        loadComponent: () => import('./planner/planner-page').then((m) => m.PlannerPage),
      },
      {
        path: 'audit',
        title: 'Audit · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/audit'))],
        loadComponent: () => import('./audit/audit-page').then((m) => m.AuditPage),
      },
      {
        path: 'people',
        title: 'People · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/users'))],
        loadComponent: () => import('./people/people-page').then((m) => m.PeoplePage),
      },
      {
        path: 'api-docs',
        title: 'API · Equilight',
        loadComponent: () => import('./api-docs/api-docs-page').then((m) => m.ApiDocsPage),
      },
      {
        path: 'intake',
        title: 'Intake · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/intake'))],
        loadComponent: () => import('./intake/intake-page').then((m) => m.IntakePage),
      },
      {
        path: 'instruments',
        title: 'Instruments · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/instruments'))],
        loadComponent: () => import('./instruments/instruments-page').then((m) => m.InstrumentsPage),
      },
      {
        path: 'outbox',
        title: 'Outbox · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/outbox'))],
        loadComponent: () => import('./outbox/outbox-page').then((m) => m.OutboxPage),
      },
      {
        path: 'webhooks',
        title: 'Webhooks · Equilight',
        canActivate: [roleGuard(...rolesOf('get', '/api/webhooks'))],
        loadComponent: () => import('./webhooks/webhooks-page').then((m) => m.WebhooksPage),
      },
    ],
  },
  { path: '**', redirectTo: '' },
]);
