import { computed, inject, Injectable } from '@angular/core';
import type { User } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { UsersApi } from './users-api';

/** The users page's state: the list, the farms the admin may give roles on, and turning sign-in on or off. */
@Injectable()
export class UsersStore {
  private readonly api = inject(UsersApi);
  private readonly auth = inject(AuthStore);

  readonly users = this.api.list();
  readonly loadStatus = computed(() => listState(this.users));
  readonly errorText = computed(() => describeApiError(this.users.error()));
  /** The farms on which the signed-in user manages users: the only roles they may hand out. */
  readonly adminFarms = this.auth.farmsWith('users.manage');
  readonly myId = computed(() => this.auth.user()?.id);
  private readonly farmNames = computed(
    () => new Map(this.auth.memberships().map((m) => [m.farmId, m.farmName])),
  );

  /** "Farm: role" for each of the user's farms. */
  rolesOf(user: User): string {
    return user.memberships
      .map((m) => `${this.farmNames().get(m.farmId) ?? `Farm ${m.farmId}`}: ${m.role}`)
      .join(', ');
  }

  /** Lets the user sign in, or stops them; the list is read again either way. */
  async setActive(user: User, isActive: boolean): Promise<void> {
    try {
      await this.api.update(user.id, { disabled: !isActive });
    } finally {
      this.users.reload();
    }
  }
}
