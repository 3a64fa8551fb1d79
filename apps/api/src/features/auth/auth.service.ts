import { hash, verify } from '@node-rs/argon2';
import type {
  ForgotPassword,
  LoginRequest,
  LoginResponse,
  Session,
  SetPassword,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { AppError } from '../../platform/errors';
import type { RequestContext } from '../../platform/auth';
import type { EventBus } from '../../platform/events';
import type { TokenService } from '../../platform/tokens';
import { findUserByEmail, findUserById, membershipsOf } from '../users/users.repository';
import { consumeUserToken, setPasswordHash } from '../notifications/notifications.repository';
import { hashLinkToken, type Notifier } from '../notifications/notifier';

/** A real argon2id hash of a random string, so an unknown e-mail costs as much time as a wrong password. */
const timingDecoy = hash(`decoy-${Math.random()}`);

export interface AuthService {
  login(input: LoginRequest): Promise<LoginResponse>;
  session(ctx: RequestContext): Promise<Session>;
  /** Mails a reset link when the address has an enabled account; says nothing either way. */
  forgot(input: ForgotPassword): Promise<void>;
  /** Sets a password from a mailed link (invitation or reset) and signs the user in. */
  setPassword(input: SetPassword): Promise<LoginResponse>;
}

export function createAuthService(
  db: Database,
  tokens: TokenService,
  notifier: Notifier,
  events: EventBus,
): AuthService {
  async function signedIn(user: { id: number; email: string; name: string }) {
    // Read again: a password just set has raised the session version.
    const current = await findUserById(db, user.id);
    const { token, expiresAt } = tokens.sign(user.id, current?.sessionVersion ?? 0);
    return {
      token,
      expiresAt: expiresAt.toISOString(),
      user: { id: user.id, email: user.email, name: user.name },
      memberships: await membershipsOf(db, user.id),
    };
  }

  return {
    async forgot({ email }) {
      const user = await findUserByEmail(db, email);
      if (user && !user.disabled) await notifier.passwordReset(user.id);
    },
    async setPassword({ token, password }) {
      const passwordHash = await hash(password);
      const user = await db.transaction(async (tx) => {
        const link = await consumeUserToken(tx, hashLinkToken(token));
        if (!link) return undefined;
        const found = await findUserById(tx, link.userId);
        if (!found || found.disabled) return undefined;
        await setPasswordHash(tx, found.id, passwordHash);
        return found;
      });
      if (!user) {
        throw new AppError(
          'validation_failed',
          'This link has expired or was already used: ask for a new one',
          [{ path: 'token', message: 'Expired or already used' }],
        );
      }
      // Sockets signed in with a token from before the new password close now.
      events.emit('user.access-changed', { userId: user.id, reason: 'password' });
      return signedIn(user);
    },
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
      return signedIn(user);
    },
    async session(ctx) {
      return {
        user: { id: ctx.user.id, email: ctx.user.email, name: ctx.user.name },
        memberships: await membershipsOf(db, ctx.user.id),
      };
    },
  };
}
