import type { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import { FlockPage } from './flock-page';
import { FlockStore } from './flock-store';

export default [
  {
    path: '',
    title: 'Flock · Tierscope',
    providers: [
      FlockStore,
      provideEchartsCore({
        echarts: () => import('../house-live/echarts-setup').then((m) => m.echarts),
      }),
    ],
    component: FlockPage,
  },
] satisfies Routes;
