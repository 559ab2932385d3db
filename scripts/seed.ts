// Usage: node --import tsx scripts/seed.ts — loads the demo data into DATABASE_URL when it is empty.
import { createDb } from '../src/lib/db/db';
import { readConfig } from '../src/lib/config';
import { isDatabaseEmpty, seedDemo } from '../sample-data/seed';

const db = createDb(readConfig().DATABASE_URL, { max: 2 });
try {
  if (await isDatabaseEmpty(db)) console.log(`[seed] ${await seedDemo(db)}`);
  else console.log('[seed] the database already has data; nothing loaded');
} catch (error) {
  console.error(`[seed] ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
