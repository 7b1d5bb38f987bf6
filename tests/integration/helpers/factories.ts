/**
 * Row factories for integration tests: users, studies with their protocol and members, runs with
 * a real NIfTI file from the phantom in a temporary storage root. Every name and e-mail carries a
 * random suffix, so tests never collide with each other or with the demo seed.
 */
import { createHash, randomBytes } from 'node:crypto';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Knex } from 'knex';
import { toJson } from '@/lib/db/knex';
import { writeNiftiFile } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type Phantom, type PhantomSize } from '@/lib/phantom';
import { ensureDirFor, newKey } from '@/lib/storage';

export type Role = 'admin' | 'lead' | 'rater' | 'observer';

export function uniqueSuffix(): string {
  return randomBytes(4).toString('hex');
}

/**
 * Points the storage root (QUORUM_UPLOADS_DIR) of this process at a fresh temporary directory;
 * returns it and a cleanup that removes it and restores the previous value.
 */
export async function useTempUploads(): Promise<{ dir: string; cleanup: () => Promise<void> }> {
  const previous = process.env.QUORUM_UPLOADS_DIR;
  const dir = await mkdtemp(path.join(tmpdir(), 'quorum-uploads-'));
  process.env.QUORUM_UPLOADS_DIR = dir;
  return {
    dir,
    async cleanup() {
      if (previous === undefined) delete process.env.QUORUM_UPLOADS_DIR;
      else process.env.QUORUM_UPLOADS_DIR = previous;
      await rm(dir, { recursive: true, force: true });
    },
  };
}

/** Inserts a user (no password) and returns its id. */
export async function createUser(db: Knex, opts: { role?: Role; name?: string; email?: string; active?: boolean } = {}): Promise<number> {
  const role = opts.role ?? 'rater';
  const s = uniqueSuffix();
  const [id] = await db('users').insert({
    email: opts.email ?? `${role}-${s}@test.quorum.invalid`,
    name: opts.name ?? `Test ${role} ${s}`,
    role,
    active: opts.active ?? true,
  });
  return Number(id);
}

export interface StudyProtocol {
  raters_per_run?: number;
  consensus_rule?: 'unanimous' | 'majority' | 'lead';
  drop_volumes?: number;
  dim_method?: 'iid-mdl' | 'iid-aic' | 'laplace' | 'aic' | 'mdl' | 'fixed' | 'variance';
  fixed_components?: number | null;
  variance_fraction?: number | null;
  variance_norm?: boolean;
  detrend?: boolean;
}

/** Inserts a study with the default label set and noise kinds; returns its id. */
export async function createStudy(db: Knex, opts: { createdBy: number; name?: string } & StudyProtocol): Promise<number> {
  const { createdBy, name, ...protocol } = opts;
  const [id] = await db('studies').insert({
    name: name ?? `Test study ${uniqueSuffix()}`,
    created_by: createdBy,
    label_set: toJson(['signal', 'noise', 'uncertain']),
    noise_kinds: toJson(['motion', 'pulsation', 'vascular', 'csf', 'white-matter', 'susceptibility', 'scanner', 'other']),
    ...protocol,
  });
  return Number(id);
}

export async function addMember(
  db: Knex,
  opts: { studyId: number; userId: number; studyRole: 'lead' | 'rater' | 'observer' },
): Promise<void> {
  await db('study_members').insert({ study_id: opts.studyId, user_id: opts.userId, study_role: opts.studyRole });
}

/** A lead, a study led by them (lead membership included) and `raters` rater members. */
export async function createStudyWithRaters(
  db: Knex,
  opts: { raters?: number } & StudyProtocol = {},
): Promise<{ leadId: number; studyId: number; raterIds: number[] }> {
  const { raters = 2, ...protocol } = opts;
  const leadId = await createUser(db, { role: 'lead' });
  const studyId = await createStudy(db, { createdBy: leadId, ...protocol });
  await addMember(db, { studyId, userId: leadId, studyRole: 'lead' });
  const raterIds: number[] = [];
  for (let i = 0; i < raters; i++) {
    const id = await createUser(db, { role: 'rater' });
    await addMember(db, { studyId, userId: id, studyRole: 'rater' });
    raterIds.push(id);
  }
  return { leadId, studyId, raterIds };
}

export interface StoredRunFile {
  fileKey: string;
  sha256: string;
  sizeBytes: number;
  phantom: Phantom;
}

/** Writes a phantom run as .nii.gz under a new `runs/` key in the current storage root. */
export async function writePhantomRunFile(opts: { size?: PhantomSize; seed?: number; volumes?: number } = {}): Promise<StoredRunFile> {
  const phantom = generatePhantom({ size: opts.size ?? 'tiny', seed: opts.seed ?? 1, volumes: opts.volumes });
  const fileKey = newKey('runs', '.nii.gz');
  const full = await ensureDirFor(fileKey);
  await writeNiftiFile(full, phantomToNiftiInput(phantom));
  const bytes = await readFile(full);
  return { fileKey, sha256: createHash('sha256').update(bytes).digest('hex'), sizeBytes: bytes.length, phantom };
}

/** Inserts a run row (status uploaded) for a stored file; returns its id. */
export async function createRun(
  db: Knex,
  opts: {
    studyId: number;
    createdBy: number;
    file: Pick<StoredRunFile, 'fileKey' | 'sha256' | 'sizeBytes'> & { phantom?: Phantom };
    sub?: string;
    maskKey?: string | null;
    motionKey?: string | null;
    motionOrder?: string | null;
    motionRotationUnits?: 'radians' | 'degrees' | null;
  },
): Promise<number> {
  const p = opts.file.phantom;
  const [id] = await db('runs').insert({
    study_id: opts.studyId,
    sub: opts.sub ?? `t${uniqueSuffix()}`,
    task: 'rest',
    original_name: 'phantom_bold.nii.gz',
    file_key: opts.file.fileKey,
    sha256: opts.file.sha256,
    size_bytes: opts.file.sizeBytes,
    mask_key: opts.maskKey ?? null,
    motion_key: opts.motionKey ?? null,
    motion_order: opts.motionOrder ?? null,
    motion_rotation_units: opts.motionRotationUnits ?? null,
    dims: p ? toJson(p.dims) : null,
    voxel_size: p ? toJson(p.voxelSize) : null,
    tr_seconds: p ? p.trSeconds : null,
    volumes: p ? p.dims[3] : null,
    datatype: p ? 'float32' : null,
    created_by: opts.createdBy,
  });
  return Number(id);
}

/** A study with raters and one run of a phantom of the given size: everything a decompose job needs. */
export async function createPhantomRun(
  db: Knex,
  opts: { size?: PhantomSize; seed?: number; raters?: number } & StudyProtocol = {},
): Promise<{ runId: number; studyId: number; leadId: number; raterIds: number[]; file: StoredRunFile }> {
  const { size, seed, ...study } = opts;
  const s = await createStudyWithRaters(db, study);
  const file = await writePhantomRunFile({ size, seed });
  const runId = await createRun(db, { studyId: s.studyId, createdBy: s.leadId, file });
  return { runId, ...s, file };
}
