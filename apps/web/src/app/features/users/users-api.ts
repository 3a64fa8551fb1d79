import { inject, Injectable } from '@angular/core';
import { endpoints, type User, type UserCreate, type UserUpdate } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The user endpoints as the web app uses them: the list as a resource, changes as calls. */
@Injectable({ providedIn: 'root' })
export class UsersApi {
  private readonly api = inject(ApiClient);

  /** The users of the farms the signed-in admin manages. */
  list() {
    return this.api.resource(endpoints.users.list, () => ({}));
  }

  create(input: UserCreate): Promise<User> {
    return this.api.call(endpoints.users.create, { body: input });
  }

  update(userId: number, input: UserUpdate): Promise<User> {
    return this.api.call(endpoints.users.update, { params: { userId }, body: input });
  }
}
