/**
 * Releases built by the worker (issue 12 item 3): the component-map file's SHA-256 and size are
 * stored with the decomposition when it is stored (NULL for decompositions stored before; a
 * release hashes those once and fills them in), and a release keeps the agreement report its job
 * computed (the JSON of lib/reports/agreement-report.ts), which the report page reads instead of
 * running the bootstrap on every view.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('decompositions', (t) => {
    t.specificType('components_sha256', 'CHAR(64)').nullable();
    t.bigInteger('components_bytes').unsigned().nullable();
  });
  await knex.schema.alterTable('releases', (t) => {
    t.specificType('agreement_report', 'LONGTEXT').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('releases', (t) => {
    t.dropColumn('agreement_report');
  });
  await knex.schema.alterTable('decompositions', (t) => {
    t.dropColumn('components_bytes');
    t.dropColumn('components_sha256');
  });
}
