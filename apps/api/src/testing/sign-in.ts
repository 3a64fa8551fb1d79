import type { Express } from 'express';
import request from 'supertest';
import { FIXTURE_PASSWORD } from './fixtures';

/** Signs in through the real login route and returns the bearer header value. */
export async function bearerFor(
  app: Express,
  email: string,
  password = FIXTURE_PASSWORD,
): Promise<string> {
  const response = await request(app).post('/api/v1/auth/login').send({ email, password });
  if (response.status !== 200) throw new Error(`sign-in of ${email} failed: ${response.status}`);
  return `Bearer ${(response.body as { token: string }).token}`;
}
