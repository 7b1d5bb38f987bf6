'use client';

import Link from 'next/link';
import { useStudyRuns, type StudyRunsData } from '@/components/runs/use-study-runs';
import { RunsTable } from '@/components/runs/runs-table';
import { UploadArea } from '@/components/runs/upload-area';
import { StudyProgressSummary } from '@/components/studies/study-progress';
import { Panel } from '@/components/ui/panel';
import { Notice } from '@/components/ui/notice';

/** The study page's live part: progress at a glance, the upload area (leads), the runs table. */
export function StudyClient({
  studyId,
  initial,
  canManage,
  readOnlyOpen = false,
  maxBytes,
}: {
  studyId: number;
  initial: StudyRunsData;
  canManage: boolean;
  readOnlyOpen?: boolean;
  maxBytes: number;
}) {
  const { data, error } = useStudyRuns(studyId, initial);
  return (
    <div className="flex flex-col gap-6">
      <StudyProgressSummary progress={data.progress} />
      {canManage ? (
        <Panel title="Upload runs">
          <UploadArea studyId={studyId} maxBytes={maxBytes} existing={data.runs} />
        </Panel>
      ) : null}
      <Panel title="Runs">
        {error ? <Notice kind="error">The runs could not be refreshed: {error.message}</Notice> : null}
        {canManage ? (
          <Link
            href={`/studies/${studyId}/assignments`}
            className="mb-3 inline-block text-sm text-lumen hover:underline"
            data-testid="study-assignments-link"
          >
            Assignments and due dates
          </Link>
        ) : null}
        <RunsTable studyId={studyId} runs={data.runs} canManage={canManage} readOnlyOpen={readOnlyOpen} />
      </Panel>
    </div>
  );
}
