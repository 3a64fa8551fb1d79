import type { Database } from '@tierscope/db';
import type { EventBus } from '../../platform/events';
import { addDays, ageInWeeks, compartmentalLay } from '@tierscope/domain';
import type { ExpectedLay } from '../evaluation/evaluation.service';
import { findHouse } from '../houses/houses.repository';
import { flocksOfHouse } from './flocks.repository';
import { computeProduction } from './flocks.service';

/**
 * The fitted lay curve of the flock in a house on a day, when the fit is good enough (domain
 * `isFitGoodEnough`); null otherwise, and the engine falls back to the 7-day average. A fit is made at most
 * once per house per day: it changes only when a day completes.
 */
export function createFlockCurves(db: Database, events?: EventBus): ExpectedLay {
  const cache = new Map<string, Promise<number | null>>();
  // A placed, changed or ended flock, or a corrected morning walk, changes the fit (in every process).
  events?.on('flock.changed', (e) => {
    for (const key of cache.keys()) if (key.startsWith(`${e.houseId}|`)) cache.delete(key);
  });
  return {
    expectedHenDayPct(houseId, day) {
      const key = `${houseId}|${day}`;
      let hit = cache.get(key);
      if (!hit) {
        if (cache.size > 1000) cache.clear();
        hit = (async () => {
          const house = await findHouse(db, houseId);
          if (!house) return null;
          const flock = (await flocksOfHouse(db, houseId)).find(
            (f) => f.placedOn <= day && (f.endedOn === null || f.endedOn >= day),
          );
          if (!flock) return null;
          // Fitted on the weeks before the last seven days, which are what the dip rule judges.
          const production = await computeProduction(db, flock, house, addDays(day, -7));
          if (!production.fit?.isGoodEnough) return null;
          return compartmentalLay(
            ageInWeeks(flock.placedOn, flock.ageAtPlacementWeeks, day),
            production.fit.params,
          );
        })();
        cache.set(key, hit);
        // A failed fit is not remembered: the next evaluation tries again.
        hit.catch(() => cache.delete(key));
      }
      return hit;
    },
  };
}
