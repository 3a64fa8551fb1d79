/** The four roles a user can hold on a farm (DESIGN.md, "Who uses it"). */
export const ROLES = ['admin', 'manager', 'crew', 'integrator'] as const;
export type Role = (typeof ROLES)[number];

/** What a role may do on a farm it belongs to. Reading the farm is open to every member. */
export const PERMISSIONS = [
  'farm.read',
  'farm.update',
  'house.create',
  'house.update',
  'house.delete',
  'users.manage',
  'counters.manage',
  'gateways.manage',
  'imports.run',
  'exceptions.acknowledge',
  'workOrders.manage',
  'workOrders.work',
  'flock.manage',
] as const;
export type Permission = (typeof PERMISSIONS)[number];

const GRANTS: Record<Role, readonly Permission[]> = {
  admin: PERMISSIONS,
  manager: [
    'farm.read',
    'house.update',
    'exceptions.acknowledge',
    'workOrders.manage',
    'workOrders.work',
    'flock.manage',
  ],
  crew: ['farm.read', 'workOrders.work'],
  integrator: ['farm.read', 'counters.manage', 'gateways.manage', 'imports.run'],
};

/** True when a member holding `role` on a farm may do `permission` there. */
export function can(role: Role, permission: Permission): boolean {
  return GRANTS[role].includes(permission);
}

/** The permissions a role holds, for the web app to hide what it may not do. */
export function permissionsOf(role: Role): readonly Permission[] {
  return GRANTS[role];
}
