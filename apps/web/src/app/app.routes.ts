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
        path: 'users',
        title: 'Users · Tierscope',
        canActivate: [permissionGuard('users.manage')],
        loadComponent: () => import('./features/users/users-page').then((m) => m.UsersPage),
      },
    ],
  },
  { path: '**', redirectTo: 'farms' },
];
