import type { Permission } from '@tierscope/domain';

export interface NavItem {
  readonly label: string;
  readonly icon: string;
  readonly link: string;
  /** Shown only to users holding this permission on some farm. */
  readonly permission: Permission;
}

export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'Farms', icon: 'agriculture', link: '/farms', permission: 'farm.read' },
  { label: 'Exceptions', icon: 'warning', link: '/exceptions', permission: 'farm.read' },
  { label: 'My work', icon: 'construction', link: '/my-work', permission: 'workOrders.work' },
  {
    label: 'Work orders',
    icon: 'assignment',
    link: '/work-orders',
    permission: 'workOrders.manage',
  },
  { label: 'Reports', icon: 'bar_chart', link: '/reports', permission: 'workOrders.manage' },
  { label: 'Imports', icon: 'upload_file', link: '/imports', permission: 'imports.run' },
  {
    label: 'Unknown counters',
    icon: 'sensors',
    link: '/counters',
    permission: 'counters.manage',
  },
  { label: 'Gateways', icon: 'router', link: '/gateways', permission: 'gateways.manage' },
  { label: 'Users', icon: 'group', link: '/users', permission: 'users.manage' },
  { label: 'Mailbox', icon: 'mail', link: '/mailbox', permission: 'users.manage' },
];
