import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

/**
 * Submissions (raw bytes stored before any scoring), scores (append-only rows,
 * one per grading key so a retried job never writes twice), flags, reviews,
 * extensions, regrades, and the release of an assignment's scores.
 */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    const q = (sql: string) => qi.sequelize.query(sql, { transaction });
    await q(`ALTER TABLE assignments ADD COLUMN "releasedAt" TIMESTAMPTZ, ADD COLUMN "releaseCount" INTEGER NOT NULL DEFAULT 0`);
    await q(`
      CREATE TABLE submissions (
        id SERIAL PRIMARY KEY,
        "assignmentId" INTEGER NOT NULL REFERENCES assignments(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "userId" INTEGER NOT NULL REFERENCES users(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "variantId" INTEGER NOT NULL REFERENCES variants(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "assignmentVersionId" INTEGER NOT NULL REFERENCES assignment_versions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        attempt INTEGER NOT NULL,
        status VARCHAR(16) NOT NULL DEFAULT 'received' CHECK (status IN ('received', 'grading', 'scored', 'failed')),
        source VARCHAR(8) NOT NULL CHECK (source IN ('file', 'text')),
        "fileName" VARCHAR(255) NOT NULL,
        bytes BYTEA NOT NULL,
        sha256 CHAR(64) NOT NULL,
        "receivedAt" TIMESTAMPTZ NOT NULL,
        "dueAt" TIMESTAMPTZ NOT NULL,
        late BOOLEAN NOT NULL DEFAULT false,
        "daysLate" INTEGER NOT NULL DEFAULT 0,
        returned BOOLEAN NOT NULL DEFAULT false,
        message TEXT,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL,
        UNIQUE ("assignmentId", "userId", attempt)
      )`);
    await q('CREATE INDEX submissions_assignment_sha ON submissions ("assignmentId", sha256)');
    await q(`
      CREATE TABLE scores (
        id SERIAL PRIMARY KEY,
        "submissionId" INTEGER NOT NULL REFERENCES submissions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "referenceId" INTEGER REFERENCES reference_spectra(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "gradeKey" VARCHAR(80) NOT NULL,
        points DOUBLE PRECISION NOT NULL,
        "maxPoints" DOUBLE PRECISION NOT NULL,
        "latePenalty" DOUBLE PRECISION NOT NULL DEFAULT 0,
        report JSONB,
        reason VARCHAR(16) NOT NULL CHECK (reason IN ('autograde', 'regrade', 'accept', 'override', 'return', 'second-look')),
        "authorId" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        comment TEXT,
        "assignmentVersion" INTEGER NOT NULL,
        "createdAt" TIMESTAMPTZ NOT NULL,
        UNIQUE ("submissionId", "gradeKey")
      )`);
    // Scores are never edited: only new rows.
    await q(`CREATE FUNCTION scores_append_only() RETURNS trigger AS $$ BEGIN RAISE EXCEPTION 'scores are append-only: write a new score row'; END $$ LANGUAGE plpgsql`);
    await q(`CREATE TRIGGER scores_no_update BEFORE UPDATE ON scores FOR EACH ROW EXECUTE FUNCTION scores_append_only()`);
    await q(`
      CREATE TABLE flags (
        id SERIAL PRIMARY KEY,
        "submissionId" INTEGER NOT NULL REFERENCES submissions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "scoreId" INTEGER REFERENCES scores(id) ON DELETE CASCADE ON UPDATE CASCADE,
        code VARCHAR(40) NOT NULL,
        message TEXT NOT NULL,
        "otherUserId" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "otherSubmissionId" INTEGER REFERENCES submissions(id) ON DELETE SET NULL ON UPDATE CASCADE,
        open BOOLEAN NOT NULL DEFAULT true,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
    await q('CREATE INDEX flags_submission ON flags ("submissionId")');
    await q(`
      CREATE TABLE reviews (
        id SERIAL PRIMARY KEY,
        "submissionId" INTEGER NOT NULL REFERENCES submissions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        kind VARCHAR(16) NOT NULL CHECK (kind IN ('flag', 'second-look')),
        state VARCHAR(16) NOT NULL DEFAULT 'open' CHECK (state IN ('open', 'accepted', 'overridden', 'returned', 'answered')),
        "requestComment" TEXT,
        "requestedById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "decisionComment" TEXT,
        "decidedById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "decidedAt" TIMESTAMPTZ,
        "scoreId" INTEGER REFERENCES scores(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
    await q(`CREATE UNIQUE INDEX reviews_one_open ON reviews ("submissionId", kind) WHERE state = 'open'`);
    await q(`
      CREATE TABLE extensions (
        id SERIAL PRIMARY KEY,
        "assignmentId" INTEGER NOT NULL REFERENCES assignments(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "userId" INTEGER NOT NULL REFERENCES users(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "dueAt" TIMESTAMPTZ NOT NULL,
        comment TEXT,
        "grantedById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL,
        UNIQUE ("assignmentId", "userId")
      )`);
    await q(`
      CREATE TABLE regrades (
        id SERIAL PRIMARY KEY,
        "assignmentId" INTEGER NOT NULL REFERENCES assignments(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "submissionId" INTEGER REFERENCES submissions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "assignmentVersionId" INTEGER NOT NULL REFERENCES assignment_versions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        reason TEXT NOT NULL,
        "requestedById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        total INTEGER NOT NULL,
        failed INTEGER NOT NULL DEFAULT 0,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    for (const t of ['regrades', 'extensions', 'reviews', 'flags', 'scores', 'submissions']) await qi.sequelize.query(`DROP TABLE IF EXISTS ${t}`, { transaction });
    await qi.sequelize.query('DROP FUNCTION IF EXISTS scores_append_only()', { transaction });
    await qi.sequelize.query('ALTER TABLE assignments DROP COLUMN "releasedAt", DROP COLUMN "releaseCount"', { transaction });
  });
}
