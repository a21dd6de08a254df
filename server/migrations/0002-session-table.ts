import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

/** The table connect-pg-simple reads and writes (its documented layout; table name "session"). */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.sequelize.query(
      `CREATE TABLE "session" (
         "sid" varchar NOT NULL COLLATE "default" PRIMARY KEY,
         "sess" json NOT NULL,
         "expire" timestamp(6) NOT NULL
       )`,
      { transaction },
    );
    await qi.sequelize.query('CREATE INDEX "IDX_session_expire" ON "session" ("expire")', { transaction });
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.dropTable('session');
}
