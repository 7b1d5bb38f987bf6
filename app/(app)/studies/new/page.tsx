import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { STUDY_DEFAULTS } from '@/lib/studies/schema';
import { StudyForm } from '@/components/studies/study-form';

export const metadata: Metadata = { title: 'New study' };

export default async function NewStudyPage() {
  await requirePageUser('studies.create');
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">New study</h1>
      <p className="max-w-3xl text-sm text-ink-muted">
        You become the study&apos;s lead. Add raters and observers on the study&apos;s settings page afterwards.
      </p>
      <StudyForm initial={STUDY_DEFAULTS} />
    </div>
  );
}
