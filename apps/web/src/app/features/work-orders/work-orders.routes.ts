import type { Routes } from '@angular/router';
import { permissionGuard } from '../../core/auth/auth-guards';
import { WorkOrderPage } from './work-order-page';
import { WorkOrderStore } from './work-order-store';
import { WorkOrdersPage } from './work-orders-page';
import { WorkOrdersStore } from './work-orders-store';

export default [
  {
    path: '',
    title: 'Work orders · Tierscope',
    canActivate: [permissionGuard('workOrders.manage')],
    providers: [WorkOrdersStore],
    component: WorkOrdersPage,
  },
  {
    path: ':workOrderId',
    title: 'Work order · Tierscope',
    canActivate: [permissionGuard('workOrders.work')],
    providers: [WorkOrderStore],
    component: WorkOrderPage,
  },
] satisfies Routes;
