import type { Routes } from '@angular/router';
import { roleGuard, signedInGuard } from './core/auth/auth.guards';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Equilight',
    loadComponent: () => import('./auth/sign-in/sign-in-page').then((m) => m.SignInPage),
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
        path: 'people',
        title: 'People · Equilight',
        canActivate: [roleGuard('admin')],
        loadComponent: () => import('./people/people-page').then((m) => m.PeoplePage),
      },
    ],
  },
  { path: '**', redirectTo: '' },
];
