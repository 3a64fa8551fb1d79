// Longer than ~350 lines on purpose: it is the authorisation matrix itself — every endpoint × every role ×
// own and other farm — with the fixtures each route needs in one place.
import { insertHouseWithLayout, schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { can, ROLES, type Role } from '@tierscope/domain';
import { endpoints, type Endpoint } from '@tierscope/contracts';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { insertGateway } from './features/gateways/gateways.repository';
import { seedFixture, type Fixture } from './testing/fixtures';
import { bearerFor } from './testing/sign-in';
import { createTestApp } from './testing/test-app';
import { longMapping } from './testing/imports';

/**
 * Every route × every role, on the user's own farm and on a farm they do not belong to.
 * The server decides; the web app only hides what a role cannot do.
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
const bearers = {} as Record<Role, string>;
let counter = 0;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
  for (const role of ROLES) bearers[role] = await bearerFor(app, fixture.usersA[role].email);
});
afterAll(async () => {
  await database.drop();
});

type Call = (bearer: string) => request.Test;

const layout = {
  rows: 2,
  tiers: 2,
  timezone: 'Europe/Amsterdam',
  lightsOn: '03:30',
  photoperiodHours: 16,
};

/** A gateway nobody depends on, to revoke. */
async function spareGateway(farmId: number): Promise<number> {
  counter += 1;
  const row = await insertGateway(database.db, {
    farmId,
    name: `spare gateway ${counter}`,
    keyHash: `hash-${counter}-${farmId}`,
    keyPrefix: 'tsg_spare',
    createdBy: fixture.usersA.admin.id,
  });
  return row.id;
}

/** A small long-layout mapping for the import routes. */
const IMPORT_MAPPING = JSON.stringify(longMapping('UTC', 'ts'));

/** A fresh work order on a farm, assigned to that farm's crew member when `isForCrew`. */
async function spareWorkOrder(farmId: number, houseId: number, isForCrew = true): Promise<number> {
  counter += 1;
  const [row] = await database.db
    .insert(schema.workOrders)
    .values({
      farmId,
      houseId,
      title: `spare order ${counter}`,
      assigneeId: isForCrew && farmId === fixture.farmA ? fixture.usersA.crew.id : null,
      createdBy: farmId === fixture.farmA ? fixture.usersA.manager.id : fixture.adminB.id,
    })
    .returning();
  return row!.id;
}

/** A counter id a gateway sent that no house has yet, to place or forget. */
async function spareUnknownCounter(farmId: number): Promise<number> {
  counter += 1;
  const [row] = await database.db
    .insert(schema.counters)
    .values({ farmId, externalId: `UNKNOWN-${counter}`, kind: 'belt' })
    .returning();
  return row!.id;
}

/** A house nobody depends on, so a delete that is allowed has something to delete. */
async function spareHouse(farmId: number): Promise<number> {
  counter += 1;
  const house = await insertHouseWithLayout(database.db, farmId, {
    name: `spare ${counter}`,
    ...layout,
    shortfallThresholdPct: 10,
  });
  return house.id;
}

const ownFarmRoutes: { name: string; call: () => Promise<Call>; allowed: Record<Role, number> }[] =
  [
    {
      name: 'GET /farms',
      call: async () => (b) => request(app).get('/api/v1/farms').set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'POST /farms',
      call: async () => (b) =>
        request(app)
          .post('/api/v1/farms')
          .set('Authorization', b)
          .send({ name: `New ${++counter}` }),
      allowed: { admin: 201, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /farms/:id',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'PATCH /farms/:id',
      call: async () => (b) =>
        request(app)
          .patch(`/api/v1/farms/${fixture.farmA}`)
          .set('Authorization', b)
          .send({ name: 'Farm A' }),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /farms/:id/houses',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}/houses`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'POST /farms/:id/houses',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/farms/${fixture.farmA}/houses`)
          .set('Authorization', b)
          .send({ name: `House ${++counter}`, ...layout }),
      allowed: { admin: 201, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /houses/:id',
      call: async () => (b) =>
        request(app).get(`/api/v1/houses/${fixture.houseA}`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'GET /houses/:id/counters',
      call: async () => (b) =>
        request(app).get(`/api/v1/houses/${fixture.houseA}/counters`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'PATCH /houses/:id',
      call: async () => (b) =>
        request(app)
          .patch(`/api/v1/houses/${fixture.houseA}`)
          .set('Authorization', b)
          .send({ shortfallThresholdPct: 12 }),
      allowed: { admin: 200, manager: 200, crew: 403, integrator: 403 },
    },
    {
      name: 'DELETE /houses/:id',
      call: async () => {
        const id = await spareHouse(fixture.farmA);
        return (b) => request(app).delete(`/api/v1/houses/${id}`).set('Authorization', b);
      },
      allowed: { admin: 204, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /farms/:id/gateways',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}/gateways`).set('Authorization', b),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'POST /farms/:id/gateways',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/farms/${fixture.farmA}/gateways`)
          .set('Authorization', b)
          .send({ name: `Gateway ${++counter}` }),
      allowed: { admin: 201, manager: 403, crew: 403, integrator: 201 },
    },
    {
      name: 'POST /gateways/:id/revoke',
      call: async () => {
        const id = await spareGateway(fixture.farmA);
        return (b) => request(app).post(`/api/v1/gateways/${id}/revoke`).set('Authorization', b);
      },
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'GET /farms/:id/unknown-counters',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}/unknown-counters`).set('Authorization', b),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'POST /unknown-counters/:id/place',
      call: async () => {
        const id = await spareUnknownCounter(fixture.farmA);
        return (b) =>
          request(app)
            .post(`/api/v1/unknown-counters/${id}/place`)
            .set('Authorization', b)
            .send({ houseId: fixture.houseA, kind: 'belt', row: 2, tier: 2 });
      },
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'DELETE /unknown-counters/:id',
      call: async () => {
        const id = await spareUnknownCounter(fixture.farmA);
        return (b) => request(app).delete(`/api/v1/unknown-counters/${id}`).set('Authorization', b);
      },
      allowed: { admin: 204, manager: 403, crew: 403, integrator: 204 },
    },
    {
      name: 'GET /users',
      call: async () => (b) => request(app).get('/api/v1/users').set('Authorization', b),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'POST /users',
      call: async () => (b) =>
        request(app)
          .post('/api/v1/users')
          .set('Authorization', b)
          .send({
            email: `u${++counter}@farm-a.test`,
            name: 'New user',
            password: 'long enough password',
            memberships: [{ farmId: fixture.farmA, role: 'crew' }],
          }),
      allowed: { admin: 201, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'PATCH /users/:id',
      call: async () => (b) =>
        request(app)
          .patch(`/api/v1/users/${fixture.usersA.crew.id}`)
          .set('Authorization', b)
          .send({ name: 'crew of A' }),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /work-orders',
      call: async () => (b) => request(app).get('/api/v1/work-orders').set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 403 },
    },
    {
      name: 'GET /work-orders/export.csv',
      call: async () => (b) =>
        request(app).get('/api/v1/work-orders/export.csv').set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 403 },
    },
    {
      name: 'POST /work-orders',
      call: async () => (b) =>
        request(app)
          .post('/api/v1/work-orders')
          .set('Authorization', b)
          .send({ houseId: fixture.houseA, title: `Order ${++counter}` }),
      allowed: { admin: 201, manager: 201, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /work-orders/:id (assigned to the crew member)',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmA, fixture.houseA);
        return (b) => request(app).get(`/api/v1/work-orders/${id}`).set('Authorization', b);
      },
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 403 },
    },
    {
      name: 'GET /work-orders/:id (assigned to nobody)',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmA, fixture.houseA, false);
        return (b) => request(app).get(`/api/v1/work-orders/${id}`).set('Authorization', b);
      },
      allowed: { admin: 200, manager: 200, crew: 403, integrator: 403 },
    },
    {
      name: 'PATCH /work-orders/:id (start)',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmA, fixture.houseA);
        return (b) =>
          request(app)
            .patch(`/api/v1/work-orders/${id}`)
            .set('Authorization', b)
            .send({ state: 'in_progress' });
      },
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 403 },
    },
    {
      name: 'PATCH /work-orders/:id (retitle)',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmA, fixture.houseA);
        return (b) =>
          request(app)
            .patch(`/api/v1/work-orders/${id}`)
            .set('Authorization', b)
            .send({ title: 'A better title' });
      },
      allowed: { admin: 200, manager: 200, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /farms/:id/assignees',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}/assignees`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /reports/work-orders',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/work-orders?farmId=${fixture.farmA}`)
          .set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /me/notifications',
      call: async () => (b) => request(app).get('/api/v1/me/notifications').set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'GET /imports',
      call: async () => (b) => request(app).get('/api/v1/imports').set('Authorization', b),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'POST /houses/:id/imports',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/houses/${fixture.houseA}/imports`)
          .set('Authorization', b)
          .field('mapping', IMPORT_MAPPING)
          .attach('file', Buffer.from('ts,row,tier,eggs\n2026-01-01T05:00Z,1,1,1\n'), 'a.csv'),
      allowed: { admin: 202, manager: 403, crew: 403, integrator: 202 },
    },
    {
      name: 'GET /farms/:id/import-mappings',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmA}/import-mappings`).set('Authorization', b),
      allowed: { admin: 200, manager: 403, crew: 403, integrator: 200 },
    },
    {
      name: 'GET /houses/:id/flocks',
      call: async () => (b) =>
        request(app).get(`/api/v1/houses/${fixture.houseA}/flocks`).set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'POST /houses/:id/flocks',
      call: async () => {
        const houseId = await spareHouse(fixture.farmA);
        return (b) =>
          request(app)
            .post(`/api/v1/houses/${houseId}/flocks`)
            .set('Authorization', b)
            .send({ placedOn: '2026-10-01', hensHoused: 100, ageAtPlacementWeeks: 17 });
      },
      allowed: { admin: 201, manager: 201, crew: 403, integrator: 403 },
    },
    {
      name: 'GET /reports/daily',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/daily?houseId=${fixture.houseA}&day=2026-11-01`)
          .set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'GET /reports/farm',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/farm?farmId=${fixture.farmA}&from=2026-11-01&to=2026-11-07`)
          .set('Authorization', b),
      allowed: { admin: 200, manager: 200, crew: 200, integrator: 200 },
    },
    {
      name: 'GET /dev/mailbox (no catcher configured)',
      call: async () => (b) => request(app).get('/api/v1/dev/mailbox').set('Authorization', b),
      allowed: { admin: 404, manager: 403, crew: 403, integrator: 403 },
    },
  ];

describe('on their own farm', () => {
  for (const route of ownFarmRoutes) {
    for (const role of ROLES) {
      it(`${route.name} as ${role} answers ${route.allowed[role]}`, async () => {
        const call = await route.call();
        const response = await call(bearers[role]);
        expect(response.status).toBe(route.allowed[role]);
        if (response.status === 403) expect(response.body.error.code).toBe('forbidden');
      });
    }
  }
});

describe('on a farm they do not belong to', () => {
  const otherFarmRoutes: { name: string; call: () => Promise<Call> }[] = [
    {
      name: 'GET /farms/:id',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}`).set('Authorization', b),
    },
    {
      name: 'PATCH /farms/:id',
      call: async () => (b) =>
        request(app)
          .patch(`/api/v1/farms/${fixture.farmB}`)
          .set('Authorization', b)
          .send({ name: 'Mine now' }),
    },
    {
      name: 'GET /farms/:id/houses',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}/houses`).set('Authorization', b),
    },
    {
      name: 'POST /farms/:id/houses',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/farms/${fixture.farmB}/houses`)
          .set('Authorization', b)
          .send({ name: 'Intruder', ...layout }),
    },
    {
      name: 'GET /houses/:id',
      call: async () => (b) =>
        request(app).get(`/api/v1/houses/${fixture.houseB}`).set('Authorization', b),
    },
    {
      name: 'GET /houses/:id/counters',
      call: async () => (b) =>
        request(app).get(`/api/v1/houses/${fixture.houseB}/counters`).set('Authorization', b),
    },
    {
      name: 'PATCH /houses/:id',
      call: async () => (b) =>
        request(app)
          .patch(`/api/v1/houses/${fixture.houseB}`)
          .set('Authorization', b)
          .send({ name: 'Taken' }),
    },
    {
      name: 'DELETE /houses/:id',
      call: async () => {
        const id = await spareHouse(fixture.farmB);
        return (b) => request(app).delete(`/api/v1/houses/${id}`).set('Authorization', b);
      },
    },
    {
      name: 'GET /farms/:id/gateways',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}/gateways`).set('Authorization', b),
    },
    {
      name: 'POST /farms/:id/gateways',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/farms/${fixture.farmB}/gateways`)
          .set('Authorization', b)
          .send({ name: 'Intruder gateway' }),
    },
    {
      name: 'POST /gateways/:id/revoke',
      call: async () => {
        const id = await spareGateway(fixture.farmB);
        return (b) => request(app).post(`/api/v1/gateways/${id}/revoke`).set('Authorization', b);
      },
    },
    {
      name: 'GET /farms/:id/unknown-counters',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}/unknown-counters`).set('Authorization', b),
    },
    {
      name: 'POST /unknown-counters/:id/place',
      call: async () => {
        const id = await spareUnknownCounter(fixture.farmB);
        return (b) =>
          request(app)
            .post(`/api/v1/unknown-counters/${id}/place`)
            .set('Authorization', b)
            .send({ houseId: fixture.houseB, kind: 'belt', row: 1, tier: 1 });
      },
    },
    {
      name: 'DELETE /unknown-counters/:id',
      call: async () => {
        const id = await spareUnknownCounter(fixture.farmB);
        return (b) => request(app).delete(`/api/v1/unknown-counters/${id}`).set('Authorization', b);
      },
    },
    {
      name: 'GET /work-orders/:id',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmB, fixture.houseB);
        return (b) => request(app).get(`/api/v1/work-orders/${id}`).set('Authorization', b);
      },
    },
    {
      name: 'PATCH /work-orders/:id',
      call: async () => {
        const id = await spareWorkOrder(fixture.farmB, fixture.houseB);
        return (b) =>
          request(app)
            .patch(`/api/v1/work-orders/${id}`)
            .set('Authorization', b)
            .send({ state: 'cancelled', cancelReason: 'Taken over' });
      },
    },
    {
      name: 'POST /work-orders (house of farm B)',
      call: async () => (b) =>
        request(app)
          .post('/api/v1/work-orders')
          .set('Authorization', b)
          .send({ houseId: fixture.houseB, title: 'Intruding order' }),
    },
    {
      name: 'GET /farms/:id/assignees',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}/assignees`).set('Authorization', b),
    },
    {
      name: 'GET /reports/work-orders',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/work-orders?farmId=${fixture.farmB}`)
          .set('Authorization', b),
    },
    {
      name: 'POST /houses/:id/imports',
      call: async () => (b) =>
        request(app)
          .post(`/api/v1/houses/${fixture.houseB}/imports`)
          .set('Authorization', b)
          .field('mapping', IMPORT_MAPPING)
          .attach('file', Buffer.from('ts,row,tier,eggs\n'), 'a.csv'),
    },
    {
      name: 'GET /farms/:id/import-mappings',
      call: async () => (b) =>
        request(app).get(`/api/v1/farms/${fixture.farmB}/import-mappings`).set('Authorization', b),
    },
    {
      name: 'POST /houses/:id/flocks',
      call: async () => {
        const houseId = await spareHouse(fixture.farmB);
        return (b) =>
          request(app)
            .post(`/api/v1/houses/${houseId}/flocks`)
            .set('Authorization', b)
            .send({ placedOn: '2026-10-01', hensHoused: 100, ageAtPlacementWeeks: 17 });
      },
    },
    {
      name: 'GET /reports/daily',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/daily?houseId=${fixture.houseB}&day=2026-11-01`)
          .set('Authorization', b),
    },
    {
      name: 'GET /reports/farm',
      call: async () => (b) =>
        request(app)
          .get(`/api/v1/reports/farm?farmId=${fixture.farmB}&from=2026-11-01&to=2026-11-07`)
          .set('Authorization', b),
    },
  ];
  for (const route of otherFarmRoutes) {
    for (const role of ROLES) {
      it(`${route.name} as ${role} of another farm answers 404, revealing nothing`, async () => {
        const response = await (await route.call())(bearers[role]);
        expect(response.status).toBe(404);
        expect(response.body.error.code).toBe('not_found');
      });
    }
  }

  it('leaves farm B untouched after all those attempts', async () => {
    const adminB = await bearerFor(app, fixture.adminB.email);
    const farm = await request(app)
      .get(`/api/v1/farms/${fixture.farmB}`)
      .set('Authorization', adminB);
    expect(farm.body.name).toBe('Farm B');
    const houses = await request(app)
      .get(`/api/v1/farms/${fixture.farmB}/houses`)
      .set('Authorization', adminB);
    expect(houses.body.map((h: { name: string }) => h.name)).not.toContain('Intruder');
    expect(houses.body.map((h: { name: string }) => h.name)).toContain('B1');
  });

  it('does not let an admin of farm A see or change a user of farm B only', async () => {
    const list = await request(app).get('/api/v1/users').set('Authorization', bearers.admin);
    expect(list.body.map((u: { email: string }) => u.email)).not.toContain(fixture.adminB.email);
    const patch = await request(app)
      .patch(`/api/v1/users/${fixture.adminB.id}`)
      .set('Authorization', bearers.admin)
      .send({ disabled: true });
    expect(patch.status).toBe(404);
  });

  it('does not let an admin of farm A hand out roles on farm B', async () => {
    const response = await request(app)
      .post('/api/v1/users')
      .set('Authorization', bearers.admin)
      .send({
        email: 'sneaky@farm-a.test',
        name: 'Sneaky',
        password: 'long enough password',
        memberships: [{ farmId: fixture.farmB, role: 'admin' }],
      });
    expect(response.status).toBe(400);
    expect(response.body.error.fields[0].path).toBe('memberships');
  });
});

describe('without a token', () => {
  const protectedRoutes = [
    '/api/v1/farms',
    `/api/v1/users`,
    '/api/v1/auth/me',
    '/api/v1/houses/1',
    '/api/v1/farms/1/houses',
    '/api/v1/work-orders',
    '/api/v1/work-orders/1',
    '/api/v1/me/notifications',
    '/api/v1/dev/mailbox',
  ];
  for (const path of protectedRoutes) {
    it(`GET ${path} answers 401`, async () => {
      const response = await request(app).get(path);
      expect(response.status).toBe(401);
    });
  }
});

describe('the permission each endpoint declares', () => {
  it('is held by exactly the roles the matrix lets in on their own farm', () => {
    // Per endpoint, every role some case of it lets in (anything but 403).
    const letIn = new Map<string, Set<Role>>();
    for (const route of ownFarmRoutes) {
      const [method, path] = route.name.split(' ');
      const key = `${method} ${path}`;
      const roles = letIn.get(key) ?? new Set<Role>();
      for (const role of ROLES) if (route.allowed[role] !== 403) roles.add(role);
      letIn.set(key, roles);
    }
    const checked: string[] = [];
    for (const feature of Object.values(endpoints)) {
      for (const endpoint of Object.values(feature) as Endpoint[]) {
        const key = `${endpoint.method.toUpperCase()} ${endpoint.path.replace(/:\w+/g, ':id')}`;
        const seen = letIn.get(key);
        if (!seen || endpoint.access === 'public' || endpoint.access === 'gateway') continue;
        const declared = ROLES.filter((role) =>
          endpoint.permission ? can(role, endpoint.permission) : true,
        );
        expect([...seen].sort(), key).toEqual([...declared].sort());
        checked.push(key);
      }
    }
    // The matrix reaches most endpoints; each it reaches is checked.
    expect(checked.length).toBeGreaterThanOrEqual(31);
  });
});
