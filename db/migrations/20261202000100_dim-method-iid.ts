/**
 * The study protocol's dimensionality methods gain 'iid-mdl' and 'iid-aic' (AIC/MDL on an
 * entropy-rate-guided i.i.d. voxel subsample, lib/decomposition/iid-subsampling.ts); new studies
 * default to 'iid-mdl'. Existing studies keep the method they have.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw(
    "ALTER TABLE studies MODIFY dim_method ENUM('iid-mdl', 'iid-aic', 'laplace', 'aic', 'mdl', 'fixed', 'variance') NOT NULL DEFAULT 'iid-mdl'",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex('studies').whereIn('dim_method', ['iid-mdl', 'iid-aic']).update({ dim_method: 'laplace' });
  await knex.raw("ALTER TABLE studies MODIFY dim_method ENUM('laplace', 'aic', 'mdl', 'fixed', 'variance') NOT NULL DEFAULT 'laplace'");
}
