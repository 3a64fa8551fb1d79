import type { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import { HouseLivePage } from './house-live-page';
import { HouseLiveStore } from './house-live-store';

export default [
  {
    path: '',
    title: 'House live · Tierscope',
    providers: [
      HouseLiveStore,
      provideEchartsCore({ echarts: () => import('./echarts-setup').then((m) => m.echarts) }),
    ],
    component: HouseLivePage,
  },
] satisfies Routes;
