// Storing a decomposition (lib/runs/ingest-decomposition.ts storeDecomposition). No `server-only`:
// the worker stores decompositions.
import type { Knex } from 'knex';
import { float32ToBlob, toJson } from '@/lib/db/knex';

/**
 * In the caller's transaction: marks the run's earlier decompositions not current, inserts the new
 * decomposition and its component rows (50 per insert), and sets the run ready. Returns the id.
 */
export async function insertCurrentDecomposition(
  trx: Knex.Transaction,
  d: {
    runId: number;
    parameters: Record<string, unknown>;
    summary: Record<string, unknown>;
    componentsKey: string;
    componentsSha256: string;
    componentsBytes: number;
    meanKey: string;
    maskKey: string;
    components: Array<{
      idx: number;
      varianceExplained: number;
      features: unknown;
      timecourse: Float32Array;
      spectrum: Float32Array;
      frequencies: Float32Array;
    }>;
  },
): Promise<number> {
  await trx('decompositions').where({ run_id: d.runId, is_current: true }).update({ is_current: false });
  const [id] = await trx('decompositions').insert({
    run_id: d.runId,
    parameters: toJson(d.parameters),
    summary: toJson(d.summary),
    components_key: d.componentsKey,
    components_sha256: d.componentsSha256,
    components_bytes: d.componentsBytes,
    mean_key: d.meanKey,
    mask_key: d.maskKey,
    k: d.components.length,
    is_current: true,
  });
  const decompositionId = Number(id);
  const rows = d.components.map((c) => ({
    decomposition_id: decompositionId,
    idx: c.idx,
    variance_explained: c.varianceExplained,
    features: toJson(c.features),
    timecourse: float32ToBlob(c.timecourse),
    spectrum: float32ToBlob(c.spectrum),
    frequencies: float32ToBlob(c.frequencies),
  }));
  for (let i = 0; i < rows.length; i += 50) await trx('components').insert(rows.slice(i, i + 50));
  await trx('runs').where({ id: d.runId }).update({ status: 'ready', status_message: null });
  return decompositionId;
}
