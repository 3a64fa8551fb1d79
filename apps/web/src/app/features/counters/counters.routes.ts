import type { Routes } from '@angular/router';
import { CountersPage } from './counters-page';
import { CountersStore } from './counters-store';

export default [
  {
    path: '',
    title: 'Unknown counters · Tierscope',
    providers: [CountersStore],
    component: CountersPage,
  },
] satisfies Routes;
