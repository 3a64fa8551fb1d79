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

/** Makes a gateway on a farm through the real route (as an admin of it) and returns its key. */
export async function gatewayKeyFor(
  app: Express,
  bearer: string,
  farmId: number,
  name = 'g',
): Promise<string> {
  const response = await request(app)
    .post(`/api/v1/farms/${farmId}/gateways`)
    .set('Authorization', bearer)
    .send({ name });
  if (response.status !== 201)
    throw new Error(`gateway for farm ${farmId} not made: ${response.status}`);
  return (response.body as { key: string }).key;
}

/** Posts readings through the ingest route as a gateway, 5,000 a batch; each batch must be taken. */
export async function postReadings(
  app: Express,
  key: string,
  readings: readonly { counter: string; ts: string; eggs: number }[],
): Promise<void> {
  for (let i = 0; i < readings.length; i += 5000) {
    const response = await request(app)
      .post('/api/v1/ingest/readings')
      .set('Authorization', `Bearer ${key}`)
      .send({ readings: readings.slice(i, i + 5000) });
    if (response.status !== 200) throw new Error(`a batch was refused: ${response.status}`);
  }
}
