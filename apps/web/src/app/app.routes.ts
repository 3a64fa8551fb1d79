import type { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
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
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'farms' },
      {
        path: 'farms',
        title: 'Farms · Tierscope',
        loadComponent: () => import('./features/farms/farms-page').then((m) => m.FarmsPage),
      },
      {
        path: 'houses/:houseId',
        title: 'House live · Tierscope',
        providers: [
          provideEchartsCore({
            echarts: () => import('./features/house-live/echarts-setup').then((m) => m.echarts),
          }),
        ],
        loadComponent: () =>
          import('./features/house-live/house-live-page').then((m) => m.HouseLivePage),
      },
      {
        path: 'exceptions',
        title: 'Exceptions · Tierscope',
        loadComponent: () =>
          import('./features/exceptions/exceptions-page').then((m) => m.ExceptionsPage),
      },
      {
        path: 'houses/:houseId/flock',
        title: 'Flock · Tierscope',
        providers: [
          provideEchartsCore({
            echarts: () => import('./features/house-live/echarts-setup').then((m) => m.echarts),
          }),
        ],
        loadComponent: () => import('./features/flock/flock-page').then((m) => m.FlockPage),
      },
      {
        path: 'houses/:houseId/settings',
        title: 'House settings · Tierscope',
        canActivate: [permissionGuard('house.update')],
        loadComponent: () =>
          import('./features/house-settings/house-settings-page').then((m) => m.HouseSettingsPage),
      },
      {
        path: 'gateways',
        title: 'Gateways · Tierscope',
        canActivate: [permissionGuard('gateways.manage')],
        loadComponent: () =>
          import('./features/gateways/gateways-page').then((m) => m.GatewaysPage),
      },
      {
        path: 'work-orders',
        title: 'Work orders · Tierscope',
        canActivate: [permissionGuard('workOrders.manage')],
        loadComponent: () =>
          import('./features/work-orders/work-orders-page').then((m) => m.WorkOrdersPage),
      },
      {
        path: 'work-orders/:workOrderId',
        title: 'Work order · Tierscope',
        canActivate: [permissionGuard('workOrders.work')],
        loadComponent: () =>
          import('./features/work-orders/work-order-page').then((m) => m.WorkOrderPage),
      },
      {
        path: 'my-work',
        title: 'My work · Tierscope',
        canActivate: [permissionGuard('workOrders.work')],
        loadComponent: () =>
          import('./features/work-orders/my-work-page').then((m) => m.MyWorkPage),
      },
      {
        path: 'reports',
        title: 'Reports · Tierscope',
        canActivate: [permissionGuard('workOrders.manage')],
        providers: [
          provideEchartsCore({
            echarts: () => import('./features/house-live/echarts-setup').then((m) => m.echarts),
          }),
        ],
        loadComponent: () => import('./features/reports/reports-page').then((m) => m.ReportsPage),
      },
      {
        path: 'imports',
        title: 'Imports · Tierscope',
        canActivate: [permissionGuard('imports.run')],
        loadComponent: () => import('./features/imports/imports-page').then((m) => m.ImportsPage),
      },
      {
        path: 'notifications',
        title: 'Notifications · Tierscope',
        loadComponent: () =>
          import('./features/notifications/notifications-page').then((m) => m.NotificationsPage),
      },
      {
        path: 'mailbox',
        title: 'Mailbox · Tierscope',
        canActivate: [permissionGuard('users.manage')],
        loadComponent: () => import('./features/mailbox/mailbox-page').then((m) => m.MailboxPage),
      },
      {
        path: 'users',
        title: 'Users · Tierscope',
        canActivate: [permissionGuard('users.manage')],
        loadComponent: () => import('./features/users/users-page').then((m) => m.UsersPage),
      },
    ],
  },
  { path: '**', redirectTo: 'farms' },
];
