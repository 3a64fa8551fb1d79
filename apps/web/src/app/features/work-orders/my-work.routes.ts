import type { Routes } from '@angular/router';
import { MyWorkPage } from './my-work-page';
import { MyWorkStore } from './my-work-store';

export default [
  { path: '', title: 'My work · Tierscope', providers: [MyWorkStore], component: MyWorkPage },
] satisfies Routes;
