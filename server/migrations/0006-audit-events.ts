import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

/** Every change a person makes to a course: who, when, what, before and after. Rows are only ever added. */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.sequelize.query(
      `CREATE TABLE audit_events (
        id BIGSERIAL PRIMARY KEY,
        "courseId" INTEGER NOT NULL REFERENCES courses(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "actorId" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        action VARCHAR(60) NOT NULL,
        "subjectType" VARCHAR(40) NOT NULL,
        "subjectId" VARCHAR(80),
        before JSONB,
        after JSONB,
        "createdAt" TIMESTAMPTZ NOT NULL DEFAULT now()
      )`,
      { transaction },
    );
    await qi.sequelize.query('CREATE INDEX audit_events_course_time ON audit_events ("courseId", "createdAt" DESC, id DESC)', { transaction });
    await qi.sequelize.query('CREATE INDEX audit_events_course_action ON audit_events ("courseId", action)', { transaction });
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TABLE IF EXISTS audit_events');
}
