import { inject } from '@angular/core';
import { Router, type CanActivateFn } from '@angular/router';
import type { Permission } from '@tierscope/domain';
import { AuthStore } from './auth-store';

export const signedInGuard: CanActivateFn = (_route, state) => {
  const auth = inject(AuthStore);
  if (auth.isSignedIn()) return true;
  const wasSignedIn = auth.session() !== null;
  auth.signOut();
  return inject(Router).createUrlTree(['/sign-in'], {
    queryParams: { returnTo: state.url, ...(wasSignedIn ? { reason: 'expired' } : {}) },
  });
};

/** Keeps a page away from roles that may not use it; the server checks again on every call. */
export function permissionGuard(permission: Permission): CanActivateFn {
  return () => {
    if (inject(AuthStore).hasPermission(permission)) return true;
    return inject(Router).createUrlTree(['/farms']);
  };
}
