import { can, type Permission, type Role } from '@tierscope/domain';
import { AppError, forbidden } from './errors';
import type { RequestContext } from './auth';

/**
 * The farm check every service runs first. A farm the user does not belong to is "not found", so its
 * existence is not revealed; a farm they belong to with too small a role is "forbidden".
 */
export function requireFarmPermission(
  ctx: RequestContext,
  farmId: number,
  permission: Permission,
  what = 'Farm',
): Role {
  const role = ctx.user.roles.get(farmId);
  if (!role) throw new AppError('not_found', `${what} not found`);
  if (!can(role, permission)) throw forbidden();
  return role;
}

/** Farms on which the user holds `permission`. */
export function farmsWith(ctx: RequestContext, permission: Permission): number[] {
  return [...ctx.user.roles].filter(([, role]) => can(role, permission)).map(([farmId]) => farmId);
}
