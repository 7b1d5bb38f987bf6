'use client';
import { useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import type { RunListItem } from '@/lib/db/queries/runs';
import { bidsName } from '@/lib/bids';
import { patchJson } from '@/lib/api/client';
import { runEntitiesSchema } from '@/lib/runs/schema';
import { Button } from '@/components/ui/button';
import { studyRunsKey } from './use-study-runs';

const FIELDS = ['sub', 'ses', 'task', 'acq', 'run'] as const;
type Entities = Record<(typeof FIELDS)[number], string>;

/**
 * A lead corrects a run's BIDS entities in the runs table (PATCH /api/runs/:id). The new name is
 * shown as it is typed; the server refuses labels another run has and changes to a released run.
 */
export function RunLabelsForm({ run, studyId, onDone }: { run: RunListItem; studyId: number; onDone: () => void }) {
  const client = useQueryClient();
  const [values, setValues] = useState<Entities>({
    sub: run.sub,
    ses: run.ses ?? '',
    task: run.task ?? '',
    acq: run.acq ?? '',
    run: run.runLabel ?? '',
  });
  const [message, setMessage] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const preview = bidsName({ sub: values.sub || '?', ses: values.ses, task: values.task, acq: values.acq, runLabel: values.run });

  const save = async () => {
    const parsed = runEntitiesSchema.safeParse(values);
    if (!parsed.success) return setMessage(parsed.error.issues[0]!.message);
    setPending(true);
    setMessage(null);
    const r = await patchJson(`/api/runs/${run.id}`, parsed.data);
    setPending(false);
    if (!r.ok) return setMessage(r.message);
    await client.invalidateQueries({ queryKey: studyRunsKey(studyId) });
    onDone();
  };

  return (
    <form
      className="flex flex-col items-end gap-1 text-xs"
      onSubmit={(e) => {
        e.preventDefault();
        void save();
      }}
      data-testid="run-labels-form"
    >
      <div className="flex flex-wrap justify-end gap-1">
        {FIELDS.map((f) => (
          <label key={f} className="flex flex-col">
            <span className="text-ink-faint">{f}</span>
            <input
              value={values[f]}
              onChange={(e) => setValues({ ...values, [f]: e.target.value })}
              className="w-16 rounded border border-line-strong bg-ground-sunken px-1 font-mono"
              data-testid={`run-label-${f}`}
            />
          </label>
        ))}
      </div>
      <p className="font-mono text-ink-faint">{preview}</p>
      <div className="flex gap-1">
        <Button type="submit" disabled={pending} data-testid="run-labels-save">
          Save labels
        </Button>
        <Button type="button" variant="quiet" onClick={onDone}>
          Keep
        </Button>
      </div>
      {message ? (
        <p className="max-w-72 text-alarm" role="alert" data-testid="run-labels-error">
          {message}
        </p>
      ) : null}
    </form>
  );
}
