import type { QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

/**
 * Datasets (bytes + sha256), assignments with immutable versions (validated
 * config JSON), variants (a recipe and the checksum of the bytes it makes),
 * reference spectra (one per variant and reference-altering configuration,
 * enforced by a unique key so a retried job never writes twice).
 * A dataset in use cannot be deleted on its own; the check is deferred to the
 * end of the transaction so that deleting a whole course (which cascades to
 * its datasets and its assignments alike) goes through.
 */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    const q = (sql: string) => qi.sequelize.query(sql, { transaction });
    await q(`
      CREATE TABLE datasets (
        id SERIAL PRIMARY KEY,
        "courseId" INTEGER NOT NULL REFERENCES courses(id) ON DELETE CASCADE ON UPDATE CASCADE,
        name VARCHAR(120) NOT NULL,
        source VARCHAR(16) NOT NULL CHECK (source IN ('upload', 'scenario')),
        format VARCHAR(8) NOT NULL CHECK (format IN ('npy', 'csv')),
        layout VARCHAR(8) NOT NULL CHECK (layout IN ('columns', 'rows')),
        "fileName" VARCHAR(255) NOT NULL,
        n INTEGER NOT NULL,
        snapshots INTEGER NOT NULL,
        pairs BOOLEAN NOT NULL DEFAULT false,
        dt DOUBLE PRECISION,
        bytes BYTEA NOT NULL,
        "bytesY" BYTEA,
        "byteSize" INTEGER NOT NULL,
        sha256 CHAR(64) NOT NULL,
        scenario JSONB,
        preview JSONB NOT NULL,
        "createdById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
    await q('CREATE INDEX datasets_course ON datasets ("courseId", "createdAt" DESC)');

    await q(`
      CREATE TABLE assignments (
        id SERIAL PRIMARY KEY,
        "courseId" INTEGER NOT NULL REFERENCES courses(id) ON DELETE CASCADE ON UPDATE CASCADE,
        title VARCHAR(200) NOT NULL,
        status VARCHAR(16) NOT NULL DEFAULT 'draft' CHECK (status IN ('draft', 'published', 'closed')),
        "dueAt" TIMESTAMPTZ NOT NULL,
        "timeZone" VARCHAR(64) NOT NULL,
        method VARCHAR(16) NOT NULL,
        "currentVersion" INTEGER NOT NULL DEFAULT 1,
        "publishedAt" TIMESTAMPTZ,
        "closedAt" TIMESTAMPTZ,
        "createdById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
    await q('CREATE INDEX assignments_course_list ON assignments ("courseId", status, "dueAt")');

    await q(`
      CREATE TABLE assignment_versions (
        id SERIAL PRIMARY KEY,
        "assignmentId" INTEGER NOT NULL REFERENCES assignments(id) ON DELETE CASCADE ON UPDATE CASCADE,
        version INTEGER NOT NULL,
        config JSONB NOT NULL,
        "datasetId" INTEGER NOT NULL REFERENCES datasets(id) ON DELETE NO ACTION ON UPDATE CASCADE DEFERRABLE INITIALLY DEFERRED,
        "recipeKey" CHAR(64) NOT NULL,
        "referenceKey" CHAR(64) NOT NULL,
        "createdById" INTEGER REFERENCES users(id) ON DELETE SET NULL ON UPDATE CASCADE,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL,
        UNIQUE ("assignmentId", version)
      )`);

    await q(`
      CREATE TABLE variants (
        id SERIAL PRIMARY KEY,
        "assignmentId" INTEGER NOT NULL REFERENCES assignments(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "userId" INTEGER REFERENCES users(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "datasetId" INTEGER NOT NULL REFERENCES datasets(id) ON DELETE NO ACTION ON UPDATE CASCADE DEFERRABLE INITIALLY DEFERRED,
        "recipeKey" CHAR(64) NOT NULL,
        mode VARCHAR(16) NOT NULL CHECK (mode IN ('same', 'per-student')),
        seed INTEGER NOT NULL,
        noise DOUBLE PRECISION NOT NULL,
        jitter DOUBLE PRECISION NOT NULL,
        parameters JSONB,
        checksum CHAR(64),
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL
      )`);
    // One variant per student and recipe; userId NULL is the dataset as the instructor gave it (the preview).
    await q('CREATE UNIQUE INDEX variants_one_per_recipe ON variants ("assignmentId", "recipeKey", "userId") NULLS NOT DISTINCT');
    await q('CREATE INDEX variants_user ON variants ("userId")');

    await q(`
      CREATE TABLE reference_spectra (
        id SERIAL PRIMARY KEY,
        "variantId" INTEGER NOT NULL REFERENCES variants(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "assignmentVersionId" INTEGER NOT NULL REFERENCES assignment_versions(id) ON DELETE CASCADE ON UPDATE CASCADE,
        "referenceKey" CHAR(64) NOT NULL,
        status VARCHAR(16) NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'ready', 'failed')),
        attempts INTEGER NOT NULL DEFAULT 0,
        message TEXT,
        reference JSONB,
        extras JSONB,
        "singularValues" JSONB,
        "modeShapes" JSONB,
        checksum CHAR(64),
        "computedAt" TIMESTAMPTZ,
        "createdAt" TIMESTAMPTZ NOT NULL,
        "updatedAt" TIMESTAMPTZ NOT NULL,
        UNIQUE ("variantId", "referenceKey")
      )`);
    await q('CREATE INDEX reference_spectra_key_status ON reference_spectra ("referenceKey", status)');
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    for (const t of ['reference_spectra', 'variants', 'assignment_versions', 'assignments', 'datasets']) {
      await qi.sequelize.query(`DROP TABLE IF EXISTS ${t}`, { transaction });
    }
  });
}
