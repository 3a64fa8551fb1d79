import type { Routes } from '@angular/router';
import { ExceptionsPage } from './exceptions-page';
import { ExceptionsStore } from './exceptions-store';

export default [
  {
    path: '',
    title: 'Exceptions · Tierscope',
    providers: [ExceptionsStore],
    component: ExceptionsPage,
  },
] satisfies Routes;
