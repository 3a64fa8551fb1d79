import type { Routes } from '@angular/router';
import { HouseSettingsPage } from './house-settings-page';
import { HouseSettingsStore } from './house-settings-store';

export default [
  {
    path: '',
    title: 'House settings · Tierscope',
    providers: [HouseSettingsStore],
    component: HouseSettingsPage,
  },
] satisfies Routes;
