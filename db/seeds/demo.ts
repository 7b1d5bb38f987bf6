/**
 * Demo data for the invented Fernhollow Imaging Core: accounts for every role and the study
 * "Evening light and sleep — resting state" with its protocol and members. Runs are added later
 * by the upload/job pipeline. Idempotent without undoing an admin's changes: a second run creates
 * only what is missing and leaves existing accounts (name, role, active flag, password) and
 * memberships as they are. Every demo password is `quorum-demo`.
 *
 * Used by `npm run seed` (scripts/seed-demo.ts), `knex seed:run` and the integration tests.
 */
import type { Knex } from 'knex';
import { hashPassword } from '@/lib/auth/password';
import { LABEL_KEYS, NOISE_KIND_KEYS } from '@/lib/vocabulary/protocol';

export const DEMO_PASSWORD = 'quorum-demo';
export const DEMO_STUDY_SLUG = 'evening-light-sleep-rest';

type Role = 'admin' | 'lead' | 'rater' | 'observer';
type StudyRole = 'lead' | 'rater' | 'observer';

export const DEMO_USERS: ReadonlyArray<{ email: string; name: string; role: Role; studyRole?: StudyRole }> = [
  { email: 'admin@fernhollow.example', name: 'Dana Okafor', role: 'admin' },
  { email: 'lead@fernhollow.example', name: 'Priya Nandakumar', role: 'lead', studyRole: 'lead' },
  { email: 'lead2@fernhollow.example', name: 'Tomasz Wierzbicki', role: 'lead' },
  { email: 'rater1@fernhollow.example', name: 'Amara Lindqvist', role: 'rater', studyRole: 'rater' },
  { email: 'rater2@fernhollow.example', name: 'Jonah Adeyemi', role: 'rater', studyRole: 'rater' },
  { email: 'rater3@fernhollow.example', name: 'Sofia Marchetti', role: 'rater', studyRole: 'rater' },
  { email: 'rater4@fernhollow.example', name: 'Kenji Halvorsen', role: 'rater', studyRole: 'rater' },
  { email: 'observer@fernhollow.example', name: 'Rafael Oyelaran', role: 'observer', studyRole: 'observer' },
];

/** Keys stored in studies.noise_kinds and label_set (lib/vocabulary/protocol.ts names them). */
export const DEMO_NOISE_KINDS = NOISE_KIND_KEYS;
export const DEMO_LABEL_SET = LABEL_KEYS;

export interface DemoSeedResult {
  /** user id by e-mail */
  users: Record<string, number>;
  studyId: number;
  created: { users: number; study: boolean };
}

/** Creates or refreshes the demo accounts, study and memberships. */
export async function seedDemo(db: Knex): Promise<DemoSeedResult> {
  const existing = await db('users')
    .whereIn(
      'email',
      DEMO_USERS.map((u) => u.email),
    )
    .select('id', 'email', 'password_hash');
  const byEmail = new Map(existing.map((r: { id: number; email: string; password_hash: string | null }) => [r.email.toLowerCase(), r]));
  const needHash = DEMO_USERS.filter((u) => !byEmail.has(u.email));
  // one salted hash per account (bcrypt, ~0.2 s each), computed before the transaction opens
  const hashes = new Map(await Promise.all(needHash.map(async (u) => [u.email, await hashPassword(DEMO_PASSWORD)] as const)));

  return db.transaction(async (trx) => {
    const users: Record<string, number> = {};
    let createdUsers = 0;
    for (const u of DEMO_USERS) {
      const row = byEmail.get(u.email);
      if (row) {
        // an existing account belongs to the facility now: its name, role, active flag and
        // password stay as an admin left them (a deactivated demo account stays deactivated)
        users[u.email] = row.id;
      } else {
        // ON DUPLICATE KEY keeps a concurrent second seeding from failing; the id is read back.
        await trx('users')
          .insert({ email: u.email, name: u.name, role: u.role, active: true, password_hash: hashes.get(u.email) })
          .onConflict('email')
          .ignore();
        const inserted = await trx('users').where({ email: u.email }).first('id');
        users[u.email] = inserted.id;
        createdUsers++;
      }
    }

    const leadId = users['lead@fernhollow.example'];
    const protocol = {
      name: 'Evening light and sleep — resting state',
      description:
        'Resting-state runs from the evening light exposure and sleep study. Three independent raters per run; ' +
        'a strict majority decides, ties and other disagreements go to the study lead.',
      raters_per_run: 3,
      consensus_rule: 'majority',
      label_set: JSON.stringify(DEMO_LABEL_SET),
      noise_kinds: JSON.stringify(DEMO_NOISE_KINDS),
      blinding: true,
      show_votes_after_submit: true,
      uncertain_in_export: 'keep',
      drop_volumes: 4,
      dim_method: 'iid-mdl', // automatic dimensionality (MDL on an i.i.d. voxel subsample)
      fixed_components: null,
      variance_norm: true,
      archived: false,
    };
    let study = await trx('studies').where({ slug: DEMO_STUDY_SLUG }).first('id');
    let createdStudy = false;
    if (!study) {
      await trx('studies').insert({ ...protocol, slug: DEMO_STUDY_SLUG, created_by: leadId });
      study = await trx('studies').where({ slug: DEMO_STUDY_SLUG }).first('id');
      createdStudy = true;
      await trx('audit_log').insert({
        actor_id: leadId,
        action: 'study.create',
        target_type: 'study',
        target_id: String(study.id),
        study_id: study.id,
        detail: JSON.stringify({ source: 'demo seed', name: protocol.name }),
      });
    }
    const studyId: number = study.id;

    // memberships only with a new study: one a lead changed or removed later stays as the lead left it
    for (const u of createdStudy ? DEMO_USERS : []) {
      if (!u.studyRole) continue;
      await trx('study_members')
        .insert({ study_id: studyId, user_id: users[u.email], study_role: u.studyRole, added_by: leadId })
        .onConflict(['study_id', 'user_id'])
        .ignore();
    }
    return { users, studyId, created: { users: createdUsers, study: createdStudy } };
  });
}

/** knex seed:run entry point. */
export async function seed(knex: Knex): Promise<void> {
  await seedDemo(knex);
}
