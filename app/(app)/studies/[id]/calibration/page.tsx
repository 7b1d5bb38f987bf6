import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden, notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { listCalibration } from '@/lib/calibration/list-calibration';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { CalibrationClient } from '@/components/calibration/calibration-client';

export const metadata: Metadata = { title: 'Calibration' };

export default async function CalibrationPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('calibration.manage');
  const id = Number((await params).id);
  if (!Number.isInteger(id) || id <= 0) notFound();
  const access = await findStudyAccess({ user, studyId: id });
  if (!access) notFound();
  if (!leadsStudy(access)) forbidden();
  const initial = await listCalibration({ user, studyId: id });
  return (
    <div className="flex flex-col gap-6">
      <div>
        <p className="text-xs text-ink-faint">
          <Link href={`/studies/${id}`} className="hover:underline">
            {access.name}
          </Link>
        </p>
        <h1 className="text-xl font-semibold">Calibration</h1>
        <p className="max-w-3xl text-sm text-ink-muted">
          A new rater is certified on the calibration set before getting live runs. Mark a ready run as a calibration run, adopt its
          decisions as the reference labels, and assign the rater: they rate it in the normal desk. Once they submit, their labels are
          scored against the reference and you certify them. Calibration runs do not count for the study&apos;s agreement or releases.
        </p>
      </div>
      <CalibrationClient studyId={id} initial={JSON.parse(JSON.stringify(initial))} />
    </div>
  );
}
