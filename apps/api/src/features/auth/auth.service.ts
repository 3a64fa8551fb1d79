import { hash, verify } from '@node-rs/argon2';
import type { LoginRequest, LoginResponse, Session } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { AppError } from '../../platform/errors';
import type { RequestContext } from '../../platform/auth';
import type { TokenService } from '../../platform/tokens';
import { findUserByEmail, membershipsOf } from '../users/users.repository';

/** A real argon2id hash of a random string, so an unknown e-mail costs as much time as a wrong password. */
const timingDecoy = hash(`decoy-${Math.random()}`);

export interface AuthService {
  login(input: LoginRequest): Promise<LoginResponse>;
  session(ctx: RequestContext): Promise<Session>;
}

export function createAuthService(db: Database, tokens: TokenService): AuthService {
  return {
    async login({ email, password }) {
      const user = await findUserByEmail(db, email);
      const isMatch = await verify(user?.passwordHash ?? (await timingDecoy), password);
      if (!user || !isMatch) {
        throw new AppError(
          'invalid_credentials',
          'That e-mail and password do not match an account',
        );
      }
      if (user.disabled) {
        throw new AppError('account_disabled', 'This account is disabled: ask your administrator');
      }
      const { token, expiresAt } = tokens.sign(user.id);
      return {
        token,
        expiresAt: expiresAt.toISOString(),
        user: { id: user.id, email: user.email, name: user.name },
        memberships: await membershipsOf(db, user.id),
      };
    },
    async session(ctx) {
      return {
        user: { id: ctx.user.id, email: ctx.user.email, name: ctx.user.name },
        memberships: await membershipsOf(db, ctx.user.id),
      };
    },
  };
}
