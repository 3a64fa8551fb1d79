/**
 * First administrator for a deployment without the demo:
 *   npm run create-admin -- --email you@example.com --name "Your Name" --farm "Farm name"
 * Reads the password from TIERSCOPE_ADMIN_PASSWORD (never from the command line, where it would be
 * kept in shell history). Uses DATABASE_URL and applies migrations first.
 */
import { parseArgs } from 'node:util';
import { hash } from '@node-rs/argon2';
import { openDatabase, runMigrations, schema } from '@tierscope/db';
import { userCreateSchema } from '@tierscope/contracts';

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: { email: { type: 'string' }, name: { type: 'string' }, farm: { type: 'string' } },
  });
  const url = process.env['DATABASE_URL'];
  if (!url) throw new Error('Set DATABASE_URL');
  const farmName = values.farm?.trim();
  if (!farmName) throw new Error('Give --farm "Farm name"');
  const input = userCreateSchema.parse({
    email: values.email,
    name: values.name,
    password: process.env['TIERSCOPE_ADMIN_PASSWORD'],
    memberships: [{ farmId: 1, role: 'admin' }],
  });
  const database = openDatabase(url, { max: 1 });
  try {
    await runMigrations(database.db);
    if (!input.password) throw new Error('Set TIERSCOPE_ADMIN_PASSWORD to the first password');
    const passwordHash = await hash(input.password);
    await database.db.transaction(async (tx) => {
      const [farm] = await tx.insert(schema.farms).values({ name: farmName }).returning();
      const [user] = await tx
        .insert(schema.users)
        .values({ email: input.email, name: input.name, passwordHash })
        .returning();
      if (!farm || !user) throw new Error('insert returned no row');
      await tx
        .insert(schema.memberships)
        .values({ userId: user.id, farmId: farm.id, role: 'admin' });
    });
    console.log(`Administrator ${input.email} created on farm "${farmName}".`);
  } finally {
    await database.close();
  }
}

void main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
