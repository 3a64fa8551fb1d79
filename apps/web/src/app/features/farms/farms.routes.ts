import type { Routes } from '@angular/router';
import { FarmsPage } from './farms-page';
import { FarmsStore } from './farms-store';

export default [
  { path: '', title: 'Farms · Tierscope', providers: [FarmsStore], component: FarmsPage },
] satisfies Routes;
