import type { Role } from '@tierscope/domain';

/** Signs a user in as the web app remembers it (before the AuthStore is made), with one role on farm 1. */
export function signInAs(role: Role): void {
  localStorage.setItem(
    'tierscope.session',
    JSON.stringify({
      token: 't',
      expiresAt: new Date(Date.now() + 60_000).toISOString(),
      user: { id: 1, email: 'a@example.test', name: 'Avery' },
      memberships: [{ farmId: 1, farmName: 'North Ridge', role }],
    }),
  );
}
