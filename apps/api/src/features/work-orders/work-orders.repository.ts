import { schema, type Queryable } from '@tierscope/db';
import { and, asc, desc, eq, inArray, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';

const {
  workOrders,
  workOrderChecklistItems,
  workOrderPhotos,
  workOrderPhotoContents,
  houses,
  farms,
  users,
  memberships,
  exceptions,
} = schema;

export type WorkOrderRow = typeof workOrders.$inferSelect;
export type NewWorkOrder = typeof workOrders.$inferInsert;

const assignee = alias(users, 'assignee');
const creator = alias(users, 'creator');

const checklistCounts = sql<string>`(
  SELECT count(*) FILTER (WHERE ci.is_checked) || '/' || count(*)
  FROM ${workOrderChecklistItems} ci WHERE ci.work_order_id = ${workOrders.id})`;

const orderColumns = {
  order: workOrders,
  farmName: farms.name,
  houseName: houses.name,
  tiers: houses.tiers,
  timezone: houses.timezone,
  assigneeName: assignee.name,
  creatorName: creator.name,
  checklist: checklistCounts,
};

function selectOrders(db: Queryable) {
  return db
    .select(orderColumns)
    .from(workOrders)
    .innerJoin(houses, eq(houses.id, workOrders.houseId))
    .innerJoin(farms, eq(farms.id, workOrders.farmId))
    .leftJoin(assignee, eq(assignee.id, workOrders.assigneeId))
    .leftJoin(creator, eq(creator.id, workOrders.createdBy));
}

export type WorkOrderListRow = Awaited<ReturnType<typeof findWorkOrder>> & object;

export async function findWorkOrder(db: Queryable, id: number) {
  const [row] = await selectOrders(db).where(eq(workOrders.id, id));
  return row;
}

export interface WorkOrderFilter {
  /** farms whose every order the caller sees */
  allOfFarms: number[];
  /** farms where the caller sees only orders assigned to them */
  ownOfFarms: number[];
  userId: number;
  houseId?: number;
  state?: string;
  assigneeId?: number;
  isMineOnly?: boolean;
  exceptionId?: number;
  /** only orders still to do whose due day is before this date */
  dueBefore?: string;
}

export async function listWorkOrders(db: Queryable, filter: WorkOrderFilter) {
  const visible: SQL[] = [];
  if (filter.allOfFarms.length > 0) visible.push(inArray(workOrders.farmId, filter.allOfFarms));
  if (filter.ownOfFarms.length > 0) {
    const own = and(
      inArray(workOrders.farmId, filter.ownOfFarms),
      eq(workOrders.assigneeId, filter.userId),
    );
    if (own) visible.push(own);
  }
  if (visible.length === 0) return [];
  const conditions: SQL[] = [];
  const anyVisible = or(...visible);
  if (anyVisible) conditions.push(anyVisible);
  if (filter.houseId !== undefined) conditions.push(eq(workOrders.houseId, filter.houseId));
  if (filter.state === 'active')
    conditions.push(inArray(workOrders.state, ['open', 'in_progress']));
  else if (filter.state) conditions.push(sql`${workOrders.state} = ${filter.state}`);
  if (filter.assigneeId !== undefined)
    conditions.push(eq(workOrders.assigneeId, filter.assigneeId));
  if (filter.isMineOnly) conditions.push(eq(workOrders.assigneeId, filter.userId));
  if (filter.exceptionId !== undefined)
    conditions.push(eq(workOrders.exceptionId, filter.exceptionId));
  if (filter.dueBefore !== undefined) {
    conditions.push(inArray(workOrders.state, ['open', 'in_progress']));
    conditions.push(sql`${workOrders.dueOn} < ${filter.dueBefore}::date`);
  }
  return selectOrders(db)
    .where(and(...conditions))
    .orderBy(asc(workOrders.createdAt), asc(workOrders.id))
    .limit(1000);
}

export async function insertWorkOrder(db: Queryable, values: NewWorkOrder): Promise<WorkOrderRow> {
  const [row] = await db.insert(workOrders).values(values).returning();
  if (!row) throw new Error('work order not inserted');
  return row;
}

export async function updateWorkOrder(
  db: Queryable,
  id: number,
  patch: Partial<NewWorkOrder>,
): Promise<void> {
  await db
    .update(workOrders)
    .set({ ...patch, updatedAt: new Date() })
    .where(eq(workOrders.id, id));
}

export async function addChecklistItems(
  db: Queryable,
  workOrderId: number,
  labels: string[],
): Promise<void> {
  if (labels.length === 0) return;
  const [last] = await db
    .select({ position: sql<number>`coalesce(max(${workOrderChecklistItems.position}), 0)` })
    .from(workOrderChecklistItems)
    .where(eq(workOrderChecklistItems.workOrderId, workOrderId));
  const start = last?.position ?? 0;
  await db
    .insert(workOrderChecklistItems)
    .values(labels.map((label, i) => ({ workOrderId, label, position: start + i + 1 })));
}

export async function checklistOf(db: Queryable, workOrderId: number) {
  return db
    .select({ item: workOrderChecklistItems, checkedByName: users.name })
    .from(workOrderChecklistItems)
    .leftJoin(users, eq(users.id, workOrderChecklistItems.checkedBy))
    .where(eq(workOrderChecklistItems.workOrderId, workOrderId))
    .orderBy(asc(workOrderChecklistItems.position));
}

/** Ticks or unticks one item of one order; answers false when the item is not on that order. */
export async function setChecklistItem(
  db: Queryable,
  workOrderId: number,
  itemId: number,
  isChecked: boolean,
  userId: number,
): Promise<boolean> {
  const rows = await db
    .update(workOrderChecklistItems)
    .set({
      isChecked,
      checkedBy: isChecked ? userId : null,
      checkedAt: isChecked ? new Date() : null,
    })
    .where(
      and(
        eq(workOrderChecklistItems.id, itemId),
        eq(workOrderChecklistItems.workOrderId, workOrderId),
      ),
    )
    .returning({ id: workOrderChecklistItems.id });
  return rows.length > 0;
}

export async function photosOf(db: Queryable, workOrderId: number) {
  return db
    .select({ photo: workOrderPhotos, uploadedByName: users.name })
    .from(workOrderPhotos)
    .leftJoin(users, eq(users.id, workOrderPhotos.uploadedBy))
    .where(eq(workOrderPhotos.workOrderId, workOrderId))
    .orderBy(asc(workOrderPhotos.uploadedAt), asc(workOrderPhotos.id));
}

export async function insertPhoto(db: Queryable, values: typeof workOrderPhotos.$inferInsert) {
  const [row] = await db.insert(workOrderPhotos).values(values).returning();
  if (!row) throw new Error('photo not inserted');
  return row;
}

export async function insertPhotoContent(db: Queryable, photoId: number, content: Buffer) {
  await db.insert(workOrderPhotoContents).values({ photoId, content });
}

/** A photo's bytes, or undefined for a photo from before they were kept in the database. */
export async function findPhotoContent(db: Queryable, photoId: number) {
  const [row] = await db
    .select({ content: workOrderPhotoContents.content })
    .from(workOrderPhotoContents)
    .where(eq(workOrderPhotoContents.photoId, photoId));
  return row?.content;
}

export async function findPhoto(db: Queryable, workOrderId: number, photoId: number) {
  const [row] = await db
    .select()
    .from(workOrderPhotos)
    .where(and(eq(workOrderPhotos.id, photoId), eq(workOrderPhotos.workOrderId, workOrderId)));
  return row;
}

/** Enabled members of a farm who can be handed work: crew, managers and admins. */
export async function farmAssignees(db: Queryable, farmId: number) {
  return db
    .select({ id: users.id, name: users.name, role: memberships.role })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(
      and(
        eq(memberships.farmId, farmId),
        inArray(memberships.role, ['crew', 'manager', 'admin']),
        eq(users.disabled, false),
      ),
    )
    .orderBy(sql`${memberships.role} <> 'crew'`, asc(users.name));
}

export async function exceptionStatusOf(db: Queryable, farmId: number, exceptionId: number) {
  const [row] = await db
    .select({ status: exceptions.status })
    .from(exceptions)
    .where(and(eq(exceptions.farmId, farmId), eq(exceptions.id, exceptionId)));
  return row?.status ?? null;
}

/** Done orders of a farm finished in [from, to), with the opening time of the exception they came from. */
export async function doneOrdersBetween(db: Queryable, farmId: number, from: Date, to: Date) {
  return db
    .select({
      houseId: workOrders.houseId,
      houseName: houses.name,
      doneAt: workOrders.doneAt,
      findingCause: workOrders.findingCause,
      exceptionOpenedAt: exceptions.openedAt,
    })
    .from(workOrders)
    .innerJoin(houses, eq(houses.id, workOrders.houseId))
    .leftJoin(
      exceptions,
      and(eq(exceptions.farmId, workOrders.farmId), eq(exceptions.id, workOrders.exceptionId)),
    )
    .where(
      and(
        eq(workOrders.farmId, farmId),
        eq(workOrders.state, 'done'),
        sql`${workOrders.doneAt} >= ${from.toISOString()}::timestamptz`,
        sql`${workOrders.doneAt} < ${to.toISOString()}::timestamptz`,
      ),
    )
    .orderBy(asc(houses.name), desc(workOrders.doneAt));
}
