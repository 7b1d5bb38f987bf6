import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { storageByStudy } from '@/lib/db/queries/storage-use';
import { Panel } from '@/components/ui/panel';
import { AdminTabs } from '@/components/admin/admin-tabs';
import { bytes } from '@/components/admin/format';

export const metadata: Metadata = { title: 'Storage' };

export default async function StoragePage() {
  const user = await requirePageUser('storage.read');
  const studies = await storageByStudy();
  const total = studies.reduce((s, x) => s + x.totalBytes, 0);
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">Facility</h1>
      <AdminTabs role={user.role} current="/admin/storage" />
      <Panel title={`Storage · ${bytes(total)} in total`}>
        <table className="w-full text-left text-sm" data-testid="storage-table">
          <thead className="text-xs text-ink-faint">
            <tr>
              <th className="py-1 font-medium">Study</th>
              <th className="py-1 text-right font-medium">Runs</th>
              <th className="py-1 text-right font-medium">Uploaded runs</th>
              <th className="py-1 text-right font-medium">Decompositions</th>
              <th className="py-1 text-right font-medium">Total</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line tabular-nums">
            {studies.map((s) => (
              <tr key={s.studyId} data-testid={`storage-${s.studyId}`}>
                <td className="py-1.5">{s.studyName}</td>
                <td className="py-1.5 text-right">{s.runs}</td>
                <td className="py-1.5 text-right">{bytes(s.runBytes)}</td>
                <td className="py-1.5 text-right">
                  {bytes(s.decompositionBytes)}
                  {s.unrecordedDecompositions ? (
                    <span className="text-ink-faint"> (+{s.unrecordedDecompositions} not measured)</span>
                  ) : null}
                </td>
                <td className="py-1.5 text-right">{bytes(s.totalBytes)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-3 text-xs text-ink-faint">
          Sizes as recorded when files were stored: uploads plus each decomposition&rsquo;s maps, mean image and mask.
        </p>
      </Panel>
    </div>
  );
}
