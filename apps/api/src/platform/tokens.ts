import jwt from 'jsonwebtoken';

const ISSUER = 'tierscope';
const AUDIENCE = 'tierscope-user';

/** What a valid token says: whose it is, the session version it was issued under, when it ends. */
export interface TokenClaims {
  userId: number;
  sessionVersion: number;
  expiresAt: Date;
}

export interface TokenService {
  sign(userId: number, sessionVersion: number): { token: string; expiresAt: Date };
  /** The claims of a valid, unexpired token; null for anything else. */
  verify(token: string): TokenClaims | null;
  readonly secret: string;
  readonly issuer: string;
  readonly audience: string;
}

/** Signed (HS256), expiring user tokens; the API never keeps sessions. */
export function createTokenService(secret: string, ttlSeconds: number): TokenService {
  return {
    secret,
    issuer: ISSUER,
    audience: AUDIENCE,
    sign(userId, sessionVersion) {
      const token = jwt.sign({ sv: sessionVersion }, secret, {
        algorithm: 'HS256',
        subject: String(userId),
        issuer: ISSUER,
        audience: AUDIENCE,
        expiresIn: ttlSeconds,
      });
      return { token, expiresAt: new Date(Date.now() + ttlSeconds * 1000) };
    },
    verify(token) {
      try {
        const claims = jwt.verify(token, secret, {
          algorithms: ['HS256'],
          issuer: ISSUER,
          audience: AUDIENCE,
        });
        if (typeof claims !== 'object') return null;
        const userId = Number(claims.sub);
        const sessionVersion = Number((claims as { sv?: unknown }).sv ?? 0);
        if (!Number.isInteger(userId) || !Number.isInteger(sessionVersion) || !claims.exp) {
          return null;
        }
        return { userId, sessionVersion, expiresAt: new Date(claims.exp * 1000) };
      } catch {
        // Expired, tampered or foreign: all mean "not signed in".
        return null;
      }
    },
  };
}
