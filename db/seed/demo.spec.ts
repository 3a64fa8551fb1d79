import { describe, expect, it } from 'vitest';
import { createTestDatabase } from '../testing';
import { isEmpty, seedDemo, DEMO_USERS } from './demo';

describe('migrations and the demo seed', () => {
  it('apply to an empty database, and the seed loads the demo farms, houses and sign-ins', async () => {
    const database = await createTestDatabase();
    try {
      expect(await isEmpty(database.db)).toBe(true);
      await seedDemo(database.db, '2026-12-01');
      expect(await isEmpty(database.db)).toBe(false);
      const farms = await database.db.query.farms.findMany();
      expect(farms.map((f) => f.name).sort()).toEqual(['North Ridge', 'Willow Creek']);
      const houses = await database.db.query.houses.findMany();
      expect(houses).toHaveLength(5);
      for (const house of houses)
        expect([house.rows, house.tiers, house.lightsOn, house.photoperiodHours]).toEqual([
          6,
          3,
          '04:00',
          16,
        ]);
      const counters = await database.db.query.counters.findMany();
      expect(counters).toHaveLength(5 * 19);
      const flocks = await database.db.query.flocks.findMany();
      for (const flock of flocks) {
        expect(flock.hensHoused).toBeGreaterThanOrEqual(30000);
        expect(flock.hensHoused).toBeLessThanOrEqual(42000);
      }
      const users = await database.db.query.users.findMany();
      expect(users.map((u) => u.email).sort()).toEqual(DEMO_USERS.map((u) => u.email).sort());
    } finally {
      await database.drop();
    }
  });
});
