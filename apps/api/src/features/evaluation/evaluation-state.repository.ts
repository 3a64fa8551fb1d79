import { schema, type Queryable } from '@tierscope/db';
import type { Streak } from '@tierscope/domain';
import { eq } from 'drizzle-orm';
import { z } from 'zod';

/**
 * What the engine keeps between evaluations of a house: each spot's streak, and what it has judged (days,
 * checkpoints, each spot's CUSUM).
 */
const { houseEvaluations } = schema;

export async function readStreaks(db: Queryable, houseId: number): Promise<Record<string, Streak>> {
  const [row] = await db
    .select()
    .from(houseEvaluations)
    .where(eq(houseEvaluations.houseId, houseId));
  return streaksSchema.parse(row?.streaks ?? {});
}

/** A house's streaks and engine state, read together (one row). */
export async function readEvaluation(
  db: Queryable,
  houseId: number,
): Promise<{ streaks: Record<string, Streak>; engine: EngineState }> {
  const [row] = await db
    .select({ streaks: houseEvaluations.streaks, engine: houseEvaluations.engine })
    .from(houseEvaluations)
    .where(eq(houseEvaluations.houseId, houseId));
  return {
    streaks: streaksSchema.parse(row?.streaks ?? {}),
    engine: engineStateSchema.parse(row?.engine ?? {}),
  };
}

/** A house's streaks and engine state, written together (one statement). */
export async function writeEvaluation(
  db: Queryable,
  houseId: number,
  streaks: Record<string, Streak>,
  engine: EngineState,
  at: Date,
) {
  await db
    .insert(houseEvaluations)
    .values({ houseId, streaks, engine, evaluatedAt: at })
    .onConflictDoUpdate({
      target: houseEvaluations.houseId,
      set: { streaks, engine, evaluatedAt: at },
    });
}

export async function writeStreaks(
  db: Queryable,
  houseId: number,
  streaks: Record<string, Streak>,
  at: Date,
) {
  await db
    .insert(houseEvaluations)
    .values({ houseId, streaks, evaluatedAt: at })
    .onConflictDoUpdate({ target: houseEvaluations.houseId, set: { streaks, evaluatedAt: at } });
}

/**
 * What the engine keeps between evaluations of a house (see evaluation.service), parsed when read: a part
 * written by an earlier version that no longer fits is dropped (the engine judges afresh), never trusted by
 * a cast.
 */
const engineStateSchema = z
  .object({
    /** the production day whose checkpoints were judged, and which */
    checkpointDay: z.string().optional().catch(undefined),
    checkpoints: z.array(z.number()).optional().catch(undefined),
    /** the last production day judged complete */
    completeDay: z.string().optional().catch(undefined),
    /** that day's eggs with silent sections and short spots filled in at their expected counts */
    completeDayEggs: z.number().optional().catch(undefined),
    /** a complete day whose readings stop before its lights-off (a late or quiet gateway): not judged a dip */
    lateDay: z.string().optional().catch(undefined),
    /** each spot's CUSUM of complete days */
    cusum: z
      .record(z.string(), z.object({ sum: z.number(), recent: z.array(z.number()) }))
      .optional()
      .catch(undefined),
    /** spots seen short once, waiting for a later stage to confirm them: key → judged stages still to wait */
    pending: z.record(z.string(), z.number()).optional().catch(undefined),
    /** the house-dip judgement of `day` as of `at` (ms), made on the complete day `completeDay` */
    henDay: z
      .object({
        day: z.string(),
        completeDay: z.string().optional(),
        at: z.number(),
        candidate: z
          .object({
            kind: z.literal('house_dip'),
            scope: z.literal('house'),
            row: z.null(),
            tier: z.null(),
            isLearning: z.boolean(),
            eggs: z.number(),
            expected: z.number(),
            ratio: z.number(),
            pValue: z.number(),
            isShort: z.boolean(),
            isRecovered: z.boolean(),
          })
          .nullable(),
      })
      .optional()
      .catch(undefined),
  })
  .catch({});

export type EngineState = z.infer<typeof engineStateSchema>;

const streaksSchema = z
  .record(z.string(), z.object({ short: z.number(), recovered: z.number(), isOpen: z.boolean() }))
  .catch({});

export async function readEngine(db: Queryable, houseId: number): Promise<EngineState> {
  const [row] = await db
    .select({ engine: houseEvaluations.engine })
    .from(houseEvaluations)
    .where(eq(houseEvaluations.houseId, houseId));
  return engineStateSchema.parse(row?.engine ?? {});
}

export async function writeEngine(db: Queryable, houseId: number, engine: EngineState, at: Date) {
  await db
    .insert(houseEvaluations)
    .values({ houseId, streaks: {}, engine, evaluatedAt: at })
    .onConflictDoUpdate({ target: houseEvaluations.houseId, set: { engine, evaluatedAt: at } });
}
