import jwt from 'jsonwebtoken';

const ISSUER = 'tierscope';
const AUDIENCE = 'tierscope-user';

export interface TokenService {
  sign(userId: number): { token: string; expiresAt: Date };
  /** The user id of a valid, unexpired token; null for anything else. */
  verify(token: string): number | null;
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
    sign(userId) {
      const token = jwt.sign({}, secret, {
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
        const id = typeof claims === 'object' ? Number(claims.sub) : Number.NaN;
        return Number.isInteger(id) ? id : null;
      } catch {
        // Expired, tampered or foreign: all mean "not signed in".
        return null;
      }
    },
  };
}
