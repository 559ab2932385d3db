import { sql, type Kysely } from 'kysely';

// Writes made without a network are queued on the device and sent later, perhaps more than once (a reply
// lost on the way back looks like a failure). Each queued write carries a key the device made up; the
// server stores it, and a resend with a known key answers the first record instead of writing another.
// Samples already have such a key; oil changes and wear-part measurements get one here.
//
// bottle_code_reservations: Sumpwise bottle codes handed out ahead of time to a device, so a rider can
// label a bottle with no signal. A code is reserved once in the whole product (primary key), so two
// devices, or a device and the online "issue a code" button, never get the same one.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('oil_changes').addColumn('client_key', 'text').execute();
  await sql`create unique index oil_changes_client_key_key on oil_changes (crew_id, client_key) where client_key is not null`.execute(
    db,
  );
  await db.schema.alterTable('wear_measurements').addColumn('client_key', 'text').execute();
  // Measurements hang off a wear part (which belongs to one crew), so a key is unique per part and looked
  // up through the part's crew.
  await sql`create unique index wear_measurements_client_key_key on wear_measurements (wear_part_id, client_key) where client_key is not null`.execute(
    db,
  );

  await db.schema
    .createTable('bottle_code_reservations')
    .addColumn('code_norm', 'text', (c) => c.primaryKey())
    .addColumn('crew_id', 'uuid', (c) => c.notNull().references('crews.id').onDelete('cascade'))
    .addColumn('user_id', 'text', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('device_key', 'text', (c) => c.notNull())
    .addColumn('reserved_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createIndex('bottle_code_reservations_device_idx')
    .on('bottle_code_reservations')
    .columns(['crew_id', 'user_id', 'device_key'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('bottle_code_reservations').execute();
  await sql`drop index if exists wear_measurements_client_key_key`.execute(db);
  await db.schema.alterTable('wear_measurements').dropColumn('client_key').execute();
  await sql`drop index if exists oil_changes_client_key_key`.execute(db);
  await db.schema.alterTable('oil_changes').dropColumn('client_key').execute();
}
