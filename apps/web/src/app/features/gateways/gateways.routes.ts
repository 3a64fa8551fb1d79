import type { Routes } from '@angular/router';
import { GatewaysPage } from './gateways-page';
import { GatewaysStore } from './gateways-store';

export default [
  { path: '', title: 'Gateways · Tierscope', providers: [GatewaysStore], component: GatewaysPage },
] satisfies Routes;
