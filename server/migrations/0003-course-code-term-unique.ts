import { QueryTypes, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

// The model names the same index (server/models/course.ts, courseCodeTermIndex).
const COURSE_CODE_TERM_INDEX = 'courses_creator_code_term_unique';

interface Duplicate {
  createdById: number;
  email: string | null;
  code: string;
  term: string;
  ids: number[];
}

/**
 * One course per code and term for each instructor who created it, whatever the case
 * ("DDS-301" in "Winter 2027" and "dds-301" in "winter 2027" are the same course).
 * Existing duplicates are never merged or deleted here: the migration stops and names them,
 * so a person decides which course to rename.
 */
export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    // Nobody may add a duplicate between the check and the index.
    await qi.sequelize.query('LOCK TABLE courses IN SHARE ROW EXCLUSIVE MODE', { transaction });
    const duplicates = await qi.sequelize.query<Duplicate>(
      `SELECT c."createdById", min(u.email) AS email, min(c.code) AS code, min(c.term) AS term,
              array_agg(c.id ORDER BY c.id) AS ids
         FROM courses c LEFT JOIN users u ON u.id = c."createdById"
        WHERE c."createdById" IS NOT NULL
        GROUP BY c."createdById", lower(c.code), lower(c.term)
       HAVING count(*) > 1
        ORDER BY c."createdById", min(c.code), min(c.term)`,
      { type: QueryTypes.SELECT, transaction },
    );
    if (duplicates.length > 0) {
      const lines = duplicates.map(
        (d) => `  - ${d.email ?? `user ${d.createdById}`}: ${d.code} in ${d.term} (course ids ${d.ids.join(', ')})`,
      );
      throw new Error(
        `Cannot make course code + term unique per instructor: ${duplicates.length} instructor/code/term ` +
          `combination(s) are used by more than one course (compared without regard to case):\n${lines.join('\n')}\n` +
          'Nothing was changed. Rename the code or term of all but one course in each group ' +
          `(UPDATE courses SET term = '...' WHERE id = ...), then run the migrations again.`,
      );
    }
    await qi.sequelize.query(
      `CREATE UNIQUE INDEX "${COURSE_CODE_TERM_INDEX}" ON courses ("createdById", lower(code), lower(term))`,
      { transaction },
    );
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query(`DROP INDEX IF EXISTS "${COURSE_CODE_TERM_INDEX}"`);
}
