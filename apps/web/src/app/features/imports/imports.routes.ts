import type { Routes } from '@angular/router';
import { ImportsPage } from './imports-page';
import { ImportsStore } from './imports-store';

export default [
  { path: '', title: 'Imports · Tierscope', providers: [ImportsStore], component: ImportsPage },
] satisfies Routes;
