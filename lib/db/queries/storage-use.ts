import 'server-only';
import { db } from '@/lib/db/knex';

export type StudyStorage = {
  studyId: number;
  studyName: string;
  runs: number;
  runBytes: number;
  decompositions: number;
  decompositionBytes: number;
  /** decompositions whose file sizes were not recorded (the total is then a lower bound) */
  unrecordedDecompositions: number;
  totalBytes: number;
};

/**
 * Storage use per study from the sizes recorded in the database: the uploaded runs
 * (runs.size_bytes) plus the files each decomposition wrote (decompositions.files_bytes).
 */
export async function storageByStudy(): Promise<StudyStorage[]> {
  const runs = db('runs').select('study_id').sum({ bytes: 'size_bytes' }).count({ n: 'id' }).groupBy('study_id').as('r');
  const decs = db('decompositions as d')
    .join('runs as dr', 'dr.id', 'd.run_id')
    .select('dr.study_id')
    .sum({ bytes: db.raw('COALESCE(d.files_bytes, 0)') })
    .count({ n: 'd.id' })
    .select(db.raw('SUM(CASE WHEN d.files_bytes IS NULL THEN 1 ELSE 0 END) as missing'))
    .groupBy('dr.study_id')
    .as('dc');
  const rows = await db('studies as s')
    .leftJoin(runs, 'r.study_id', 's.id')
    .leftJoin(decs, 'dc.study_id', 's.id')
    .select(
      's.id as studyId',
      's.name as studyName',
      'r.n as runs',
      'r.bytes as runBytes',
      'dc.n as decompositions',
      'dc.bytes as decompositionBytes',
      'dc.missing as missing',
    )
    .orderBy('s.name');
  return rows.map((r) => {
    const runBytes = Number(r.runBytes ?? 0);
    const decompositionBytes = Number(r.decompositionBytes ?? 0);
    return {
      studyId: r.studyId,
      studyName: r.studyName,
      runs: Number(r.runs ?? 0),
      runBytes,
      decompositions: Number(r.decompositions ?? 0),
      decompositionBytes,
      unrecordedDecompositions: Number(r.missing ?? 0),
      totalBytes: runBytes + decompositionBytes,
    };
  });
}

export type StorageFaultSummary = { kind: 'full' | 'denied'; count: number; lastAt: Date };

/** Storage faults (audit action storage.fault) of the last 24 hours, per kind, for the admin's alert. */
export async function recentStorageFaults(): Promise<StorageFaultSummary[]> {
  const rows = await db('audit_log')
    .where({ action: 'storage.fault' })
    .where('created_at', '>', db.raw('NOW(3) - INTERVAL 1 DAY'))
    .select(db.raw("JSON_UNQUOTE(JSON_EXTRACT(detail, '$.kind')) AS kind"), db.raw('COUNT(*) AS n'), db.raw('MAX(created_at) AS lastAt'))
    .groupByRaw("JSON_UNQUOTE(JSON_EXTRACT(detail, '$.kind'))");
  return rows
    .filter((r: { kind: string }) => r.kind === 'full' || r.kind === 'denied')
    .map((r: { kind: 'full' | 'denied'; n: number; lastAt: Date }) => ({ kind: r.kind, count: Number(r.n), lastAt: new Date(r.lastAt) }));
}
