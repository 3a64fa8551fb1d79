import { createHash, randomBytes } from 'node:crypto';

const KEY_MARK = 'tsg_';

/**
 * A new gateway key: 32 random bytes, so a fast hash is enough to store it safely (no password-style
 * stretching is needed for a secret nobody chose). Shown once; only its SHA-256 is kept.
 */
export function newGatewayKey(): { key: string; hash: string; prefix: string } {
  const key = `${KEY_MARK}${randomBytes(32).toString('base64url')}`;
  return { key, hash: hashGatewayKey(key), prefix: key.slice(0, 12) };
}

export function hashGatewayKey(key: string): string {
  return createHash('sha256').update(key).digest('hex');
}

export function looksLikeGatewayKey(token: string): boolean {
  return token.startsWith(KEY_MARK) && token.length > 20;
}
