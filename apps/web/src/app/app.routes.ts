import type { Routes } from '@angular/router';
import { permissionGuard, signedInGuard } from './core/auth/auth-guards';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Tierscope',
    loadComponent: () => import('./features/sign-in/sign-in-page').then((m) => m.SignInPage),
  },
  {
    path: 'forgot-password',
    title: 'Forgot password · Tierscope',
    loadComponent: () =>
      import('./features/sign-in/forgot-password-page').then((m) => m.ForgotPasswordPage),
  },
  {
    path: 'set-password',
    title: 'Choose a password · Tierscope',
    loadComponent: () =>
      import('./features/sign-in/set-password-page').then((m) => m.SetPasswordPage),
  },
  {
    path: '',
    canActivate: [signedInGuard],
    loadComponent: () => import('./core/shell/shell').then((m) => m.Shell),
    // Each feature declares its own routes, with its store provided on them (features/*/*.routes.ts).
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'farms' },
      { path: 'farms', loadChildren: () => import('./features/farms/farms.routes') },
      {
        path: 'houses/:houseId/flock',
        loadChildren: () => import('./features/flock/flock.routes'),
      },
      {
        path: 'houses/:houseId/settings',
        canActivate: [permissionGuard('house.update')],
        loadChildren: () => import('./features/house-settings/house-settings.routes'),
      },
      {
        path: 'houses/:houseId',
        loadChildren: () => import('./features/house-live/house-live.routes'),
      },
      { path: 'exceptions', loadChildren: () => import('./features/exceptions/exceptions.routes') },
      {
        path: 'counters',
        canActivate: [permissionGuard('counters.manage')],
        loadChildren: () => import('./features/counters/counters.routes'),
      },
      {
        path: 'gateways',
        canActivate: [permissionGuard('gateways.manage')],
        loadChildren: () => import('./features/gateways/gateways.routes'),
      },
      {
        path: 'work-orders',
        loadChildren: () => import('./features/work-orders/work-orders.routes'),
      },
      {
        path: 'my-work',
        canActivate: [permissionGuard('workOrders.work')],
        loadChildren: () => import('./features/work-orders/my-work.routes'),
      },
      {
        path: 'reports',
        canActivate: [permissionGuard('workOrders.manage')],
        loadChildren: () => import('./features/reports/reports.routes'),
      },
      {
        path: 'imports',
        canActivate: [permissionGuard('imports.run')],
        loadChildren: () => import('./features/imports/imports.routes'),
      },
      {
        path: 'notifications',
        loadChildren: () => import('./features/notifications/notifications.routes'),
      },
      {
        path: 'mailbox',
        canActivate: [permissionGuard('users.manage')],
        loadChildren: () => import('./features/mailbox/mailbox.routes'),
      },
      {
        path: 'users',
        canActivate: [permissionGuard('users.manage')],
        loadChildren: () => import('./features/users/users.routes'),
      },
    ],
  },
  { path: '**', redirectTo: 'farms' },
];
