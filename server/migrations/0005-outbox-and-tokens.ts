import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

/**
 * outbox: every e-mail the site sends, one row per message key (a message is
 * sent at most once per key); the mail job moves it queued -> sending -> sent,
 * or back to queued (with lastError) while the SMTP server refuses, and to
 * failed once the retries are spent.
 *
 * tokens: single-use, expiring links sent by e-mail (sign-up confirmation,
 * course invitation, password reset). Only the sha256 of a token is stored.
 */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.sequelize.query(
      `CREATE TABLE outbox (
        id SERIAL PRIMARY KEY,
        key VARCHAR(200) NOT NULL,
        "to" VARCHAR(254) NOT NULL,
        subject VARCHAR(300) NOT NULL,
        text TEXT NOT NULL,
        html TEXT,
        state VARCHAR(16) NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'sending', 'sent', 'failed')),
        attempts INTEGER NOT NULL DEFAULT 0,
        "lastError" TEXT,
        "sentAt" TIMESTAMPTZ,
        "courseId" INTEGER REFERENCES courses(id) ON DELETE CASCADE ON UPDATE CASCADE,
        kind VARCHAR(40),
        "createdAt" TIMESTAMPTZ NOT NULL DEFAULT now(),
        "updatedAt" TIMESTAMPTZ NOT NULL DEFAULT now(),
        CONSTRAINT outbox_key_unique UNIQUE (key)
      )`,
      { transaction },
    );
    await qi.sequelize.query('CREATE INDEX outbox_course_state ON outbox ("courseId", state) WHERE "courseId" IS NOT NULL', { transaction });
    await qi.sequelize.query(`CREATE INDEX outbox_unsent ON outbox (state, "updatedAt") WHERE state <> 'sent'`, { transaction });

    await qi.sequelize.query(
      `CREATE TABLE tokens (
        id SERIAL PRIMARY KEY,
        purpose VARCHAR(20) NOT NULL CHECK (purpose IN ('sign-up', 'invitation', 'password-reset')),
        hash CHAR(64) NOT NULL,
        email VARCHAR(254) NOT NULL,
        "userId" INTEGER REFERENCES users(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "courseId" INTEGER REFERENCES courses(id) ON DELETE CASCADE ON UPDATE CASCADE,
        role VARCHAR(20) CHECK (role IS NULL OR role IN ('instructor', 'teaching_assistant', 'student')),
        "createdById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        data JSONB,
        "expiresAt" TIMESTAMPTZ NOT NULL,
        "usedAt" TIMESTAMPTZ,
        "usedById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "revokedAt" TIMESTAMPTZ,
        "createdAt" TIMESTAMPTZ NOT NULL DEFAULT now(),
        "updatedAt" TIMESTAMPTZ NOT NULL DEFAULT now(),
        CONSTRAINT tokens_hash_unique UNIQUE (hash),
        CONSTRAINT tokens_invitation_has_course CHECK (purpose <> 'invitation' OR ("courseId" IS NOT NULL AND role IS NOT NULL))
      )`,
      { transaction },
    );
    await qi.sequelize.query('CREATE INDEX tokens_course_invitations ON tokens ("courseId", "createdAt") WHERE purpose = \'invitation\'', { transaction });
    await qi.sequelize.query('CREATE INDEX tokens_email_purpose ON tokens (lower(email), purpose)', { transaction });
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TABLE IF EXISTS tokens');
  await qi.sequelize.query('DROP TABLE IF EXISTS outbox');
}
