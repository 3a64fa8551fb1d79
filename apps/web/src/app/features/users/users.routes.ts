import type { Routes } from '@angular/router';
import { UsersPage } from './users-page';
import { UsersStore } from './users-store';

export default [
  { path: '', title: 'Users · Tierscope', providers: [UsersStore], component: UsersPage },
] satisfies Routes;
