import Link from 'next/link';
import type { StudySummary } from '@/lib/db/queries/studies';
import { Panel } from '@/components/ui/panel';

export function StudyList({ title, studies, empty }: { title: string; studies: StudySummary[]; empty: string }) {
  return (
    <Panel title={title}>
      {studies.length === 0 ? (
        <p className="text-sm text-ink-muted">{empty}</p>
      ) : (
        <ul className="divide-y divide-line" data-testid="study-list">
          {studies.map((s) => (
            <li key={s.id} className="flex items-center justify-between py-2">
              <div>
                <Link href={`/studies/${s.id}`} className="font-medium hover:text-lumen-strong">
                  {s.name}
                </Link>
                {s.description ? <p className="text-xs text-ink-faint">{s.description}</p> : null}
              </div>
              <p className="text-sm text-ink-muted">
                {s.readyRuns} of {s.runs} runs ready
              </p>
            </li>
          ))}
        </ul>
      )}
    </Panel>
  );
}
