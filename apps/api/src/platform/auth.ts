import { MAX_DB_ID } from '@tierscope/contracts';
import type { Role } from '@tierscope/domain';
import type { RequestHandler } from 'express';
import { Passport } from 'passport';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import { AppError } from './errors';
import type { TokenService } from './tokens';

/** The signed-in user as every service sees them. */
export interface AuthUser {
  readonly id: number;
  readonly email: string;
  readonly name: string;
  /** farm id → role on that farm */
  readonly roles: ReadonlyMap<number, Role>;
  /** tokens issued under another version (before a password reset) are refused */
  readonly sessionVersion: number;
}

export interface RequestContext {
  readonly user: AuthUser;
}

export type LoadActiveUser = (userId: number) => Promise<AuthUser | null>;

declare module 'express-serve-static-core' {
  interface Request {
    ctx?: RequestContext;
  }
}

/**
 * Bearer-token authentication through passport-jwt. The user is re-read on every request, so a
 * disabled user or a changed role takes effect at once, not when the token expires.
 */
export function createAuthenticator(
  tokens: TokenService,
  loadUser: LoadActiveUser,
): RequestHandler {
  const passport = new Passport();
  passport.use(
    new JwtStrategy(
      {
        jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(),
        secretOrKey: tokens.secret,
        algorithms: ['HS256'],
        issuer: tokens.issuer,
        audience: tokens.audience,
      },
      (
        payload: { sub?: string; sv?: unknown },
        done: (error: unknown, user?: AuthUser | false) => void,
      ) => {
        const userId = Number(payload.sub);
        const sessionVersion = Number(payload.sv ?? 0);
        if (!Number.isInteger(userId) || userId > MAX_DB_ID || !Number.isInteger(sessionVersion)) {
          done(null, false);
          return;
        }
        loadUser(userId).then(
          (user) => {
            done(null, user?.sessionVersion === sessionVersion ? user : false);
          },
          (error: unknown) => {
            done(error);
          },
        );
      },
    ),
  );
  const authenticate = passport.initialize();
  return (req, res, next) => {
    authenticate(req, res, () => {
      // passport types the custom-callback form as `any`; it returns the middleware to call.
      const middleware = passport.authenticate(
        'jwt',
        { session: false },
        (error: unknown, user: AuthUser | false) => {
          if (error) {
            next(error);
            return;
          }
          if (!user) {
            next(
              new AppError(
                'unauthenticated',
                'Sign in again: your session is missing or has expired',
              ),
            );
            return;
          }
          req.ctx = { user };
          next();
        },
      ) as RequestHandler;
      void middleware(req, res, next);
    });
  };
}

/** The context that `createAuthenticator` set; routes behind it always have one. */
export function contextOf(req: { ctx?: RequestContext }): RequestContext {
  if (!req.ctx) throw new AppError('unauthenticated', 'Sign in first');
  return req.ctx;
}
