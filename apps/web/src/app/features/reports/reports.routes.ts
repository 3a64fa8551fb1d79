import type { Routes } from '@angular/router';
import { provideEchartsCore } from 'ngx-echarts';
import { ReportsPage } from './reports-page';
import { DailyReportStore, FarmSummaryStore, WorkOrderReportStore } from './reports-store';

export default [
  {
    path: '',
    title: 'Reports · Tierscope',
    providers: [
      DailyReportStore,
      FarmSummaryStore,
      WorkOrderReportStore,
      provideEchartsCore({
        echarts: () => import('../house-live/echarts-setup').then((m) => m.echarts),
      }),
    ],
    component: ReportsPage,
  },
] satisfies Routes;
