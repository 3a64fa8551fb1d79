import { computed, inject, Injectable, signal, type Signal } from '@angular/core';
import {
  loginResponseSchema,
  type ForgotPassword,
  type LoginRequest,
  type Membership,
  type Session,
  type SetPassword,
  endpoints,
} from '@tierscope/contracts';
import { can, type Permission } from '@tierscope/domain';
import { ApiClient } from '../http/api-client';

const STORAGE_KEY = 'tierscope.session';

interface StoredSession extends Session {
  token: string;
  expiresAt: string;
}

/** Who is signed in, their token and their farm roles; the one source the app asks "may I show this?". */
@Injectable({ providedIn: 'root' })
export class AuthStore {
  private readonly api = inject(ApiClient);
  private readonly stored = signal<StoredSession | null>(readStored());

  readonly session = this.stored.asReadonly();
  readonly isSignedIn = computed(() => {
    const s = this.stored();
    return s !== null && new Date(s.expiresAt).getTime() > Date.now();
  });
  readonly user = computed(() => this.stored()?.user ?? null);
  readonly memberships = computed<Membership[]>(() => this.stored()?.memberships ?? []);
  readonly token = computed(() => this.stored()?.token ?? null);

  /** The farms on which the user holds `permission`, as a signal that follows the session. */
  farmsWith(permission: Permission): Signal<Membership[]> {
    return computed(() => this.memberships().filter((m) => can(m.role, permission)));
  }

  /** True when the user holds `permission` on at least one farm (or on `farmId` when given). */
  hasPermission(permission: Permission, farmId?: number): boolean {
    return this.memberships().some(
      (m) => (farmId === undefined || m.farmId === farmId) && can(m.role, permission),
    );
  }

  async signIn(credentials: LoginRequest): Promise<void> {
    const response = await this.api.call(endpoints.auth.login, { body: credentials });
    const session: StoredSession = response;
    localStorage.setItem(STORAGE_KEY, JSON.stringify(session));
    this.stored.set(session);
  }

  /** Asks for a password-reset link; the answer is the same whether or not the address has an account. */
  async requestPasswordReset(input: ForgotPassword): Promise<string> {
    const answer = await this.api.call(endpoints.auth.forgotPassword, { body: input });
    return answer.message;
  }

  /** Chooses a password through a mailed link (invitation or reset); the answer signs the user in. */
  async setPassword(input: SetPassword): Promise<void> {
    const response = await this.api.call(endpoints.auth.setPassword, { body: input });
    localStorage.setItem(STORAGE_KEY, JSON.stringify(response));
    this.stored.set(response);
  }

  signOut(): void {
    localStorage.removeItem(STORAGE_KEY);
    this.stored.set(null);
  }
}

function readStored(): StoredSession | null {
  try {
    const raw = localStorage.getItem(STORAGE_KEY);
    if (!raw) return null;
    const parsed = loginResponseSchema.safeParse(JSON.parse(raw));
    return parsed.success ? parsed.data : null;
  } catch {
    // Storage blocked or corrupt: behave as signed out.
    return null;
  }
}
