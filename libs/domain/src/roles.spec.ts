import { describe, expect, it } from 'vitest';
import { can, PERMISSIONS, permissionsOf, ROLES } from './roles';

describe('roles', () => {
  it('lets every role read the farms it belongs to', () => {
    for (const role of ROLES) expect(can(role, 'farm.read')).toBe(true);
  });

  it('keeps user management with admins only', () => {
    expect(ROLES.filter((role) => can(role, 'users.manage'))).toEqual(['admin']);
  });

  it('gives the crew work orders to work but not to manage', () => {
    expect(can('crew', 'workOrders.work')).toBe(true);
    expect(can('crew', 'workOrders.manage')).toBe(false);
    expect(can('crew', 'house.update')).toBe(false);
  });

  it('lets integrators run imports and manage counters but not change house settings', () => {
    expect(can('integrator', 'imports.run')).toBe(true);
    expect(can('integrator', 'counters.manage')).toBe(true);
    expect(can('integrator', 'house.update')).toBe(false);
  });

  it('lets managers change house settings but not create or delete houses', () => {
    expect(can('manager', 'house.update')).toBe(true);
    expect(can('manager', 'house.create')).toBe(false);
    expect(can('manager', 'house.delete')).toBe(false);
  });

  it('grants admins every permission', () => {
    expect(permissionsOf('admin')).toEqual(PERMISSIONS);
  });
});
