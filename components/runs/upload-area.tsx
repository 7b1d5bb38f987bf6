'use client';

import { useCallback, useLayoutEffect, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { parseBidsName, bidsName } from '@/lib/bids';
import { fileNameProblem, formatBytes, MOTION_ORDER_NAMES, MOTION_ORDERS, runEntitiesSchema } from '@/lib/runs/schema';
import { postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { sendFile } from './upload-request';
import { studyRunsKey } from './use-study-runs';

type Entities = { sub: string; ses: string; task: string; acq: string; run: string };
type Phase = 'pending' | 'uploading' | 'attaching' | 'queued' | 'refused' | 'attention';
type Item = {
  key: string;
  file: File;
  entities: Entities;
  mask: File | null;
  motion: File | null;
  motionOrder: (typeof MOTION_ORDERS)[number];
  motionUnits: 'radians' | 'degrees';
  phase: Phase;
  progress: number;
  message: string | null;
  runId: number | null;
};

const ENTITY_FIELDS: { key: keyof Entities; label: string }[] = [
  { key: 'sub', label: 'sub' },
  { key: 'ses', label: 'ses' },
  { key: 'task', label: 'task' },
  { key: 'acq', label: 'acq' },
  { key: 'run', label: 'run' },
];

function entityErrors(e: Entities): Partial<Record<keyof Entities, string>> {
  const r = runEntitiesSchema.safeParse(e);
  if (r.success) return {};
  const out: Partial<Record<keyof Entities, string>> = {};
  for (const issue of r.error.issues) out[issue.path[0] as keyof Entities] ??= issue.message;
  return out;
}

/**
 * Drag-and-drop (or pick) one or many .nii/.nii.gz runs; each gets its own card with the BIDS
 * entities parsed from its name (editable), an optional mask and motion table, and a progress bar.
 * One file per request: the run (POST /api/studies/:id/runs), then its attachments
 * (PUT /api/runs/:id/mask|motion), then POST /api/runs/:id/queue. A refused file shows its message;
 * the others go on.
 */
export function UploadArea({ studyId, maxBytes }: { studyId: number; maxBytes: number }) {
  const client = useQueryClient();
  const [items, setItems] = useState<Item[]>([]);
  const [dragging, setDragging] = useState(false);
  const [busy, setBusy] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const itemsRef = useRef<Item[]>([]);
  useLayoutEffect(() => {
    itemsRef.current = items;
  });

  const update = useCallback((key: string, patch: Partial<Item>) => {
    setItems((list) => list.map((it) => (it.key === key ? { ...it, ...patch } : it)));
  }, []);

  const addFiles = (files: FileList | File[]) => {
    const added: Item[] = [...files].map((file, i) => {
      const parsed = parseBidsName(file.name);
      const problem = fileNameProblem(file.name, 'image') ?? (file.size > maxBytes ? `The file is ${formatBytes(file.size)}, over this facility's upload limit of ${formatBytes(maxBytes)}.` : null);
      return {
        key: `${Date.now()}-${i}-${file.name}`,
        file,
        entities: { sub: parsed?.sub ?? '', ses: parsed?.ses ?? '', task: parsed?.task ?? '', acq: parsed?.acq ?? '', run: parsed?.runLabel ?? '' },
        mask: null,
        motion: null,
        motionOrder: 'trans-first',
        motionUnits: 'radians',
        phase: problem ? 'refused' : 'pending',
        progress: 0,
        message: problem,
        runId: null,
      };
    });
    setItems((list) => [...list, ...added]);
  };

  const queue = async (item: Item, runId: number) => {
    const r = await postJson(`/api/runs/${runId}/queue`, {});
    if (r.ok) update(item.key, { phase: 'queued', message: null });
    else update(item.key, { phase: 'attention', message: r.message });
    await client.invalidateQueries({ queryKey: studyRunsKey(studyId) });
  };

  const uploadOne = async (item: Item) => {
    update(item.key, { phase: 'uploading', progress: 0, message: null });
    const e = item.entities;
    const params = new URLSearchParams({ name: item.file.name, sub: e.sub, ses: e.ses, task: e.task, acq: e.acq, run: e.run });
    const attachments = Boolean(item.mask || item.motion);
    if (!attachments) params.set('queue', 'true');
    const result = await sendFile<{ run: { id: number } }>('POST', `/api/studies/${studyId}/runs?${params}`, item.file, (f) => update(item.key, { progress: f }));
    if (!result.ok) {
      update(item.key, { phase: 'refused', message: result.message });
      return;
    }
    const runId = result.data.run.id;
    update(item.key, { runId, progress: 1 });
    await client.invalidateQueries({ queryKey: studyRunsKey(studyId) });
    if (!attachments) {
      update(item.key, { phase: 'queued' });
      return;
    }
    update(item.key, { phase: 'attaching' });
    const problems: string[] = [];
    if (item.mask) {
      const r = await sendFile('PUT', `/api/runs/${runId}/mask?${new URLSearchParams({ name: item.mask.name })}`, item.mask);
      if (!r.ok) problems.push(`Mask ${item.mask.name}: ${r.message}`);
    }
    if (item.motion) {
      const q = new URLSearchParams({ name: item.motion.name, order: item.motionOrder, units: item.motionUnits });
      const r = await sendFile('PUT', `/api/runs/${runId}/motion?${q}`, item.motion);
      if (!r.ok) problems.push(`Motion file ${item.motion.name}: ${r.message}`);
    }
    if (problems.length) {
      update(item.key, { phase: 'attention', message: `${problems.join(' ')} The run was uploaded but not queued.` });
      return;
    }
    await queue(item, runId);
  };

  const uploadAll = async () => {
    setBusy(true);
    const pending = itemsRef.current.filter((it) => it.phase === 'pending' && Object.keys(entityErrors(it.entities)).length === 0);
    // two at a time: progress stays visible per file and the server is not flooded
    let next = 0;
    const worker = async () => {
      while (next < pending.length) {
        const it = pending[next++];
        const current = itemsRef.current.find((x) => x.key === it.key) ?? it;
        await uploadOne(current);
      }
    };
    await Promise.all([worker(), worker()]);
    setBusy(false);
  };

  const pendingCount = items.filter((it) => it.phase === 'pending').length;
  const invalidCount = items.filter((it) => it.phase === 'pending' && Object.keys(entityErrors(it.entities)).length > 0).length;

  return (
    <div className="flex flex-col gap-3" data-testid="upload-area">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={(e) => {
          e.preventDefault();
          setDragging(false);
          if (e.dataTransfer.files.length) addFiles(e.dataTransfer.files);
        }}
        className={`flex flex-col items-center gap-2 rounded-lg border-2 border-dashed px-4 py-6 text-sm ${dragging ? 'border-lumen bg-lumen/10' : 'border-line-strong'}`}
        data-testid="upload-drop"
      >
        <p>Drop preprocessed 4D runs here (.nii or .nii.gz), one or many at once.</p>
        <p className="text-xs text-ink-faint">BIDS entities are read from each file name; check them before uploading. Limit {formatBytes(maxBytes)} per file.</p>
        <Button type="button" variant="quiet" onClick={() => input.current?.click()}>Choose files…</Button>
        <input
          ref={input}
          type="file"
          multiple
          accept=".nii,.gz,application/gzip"
          className="sr-only"
          aria-label="Choose run files"
          data-testid="upload-input"
          onChange={(e) => {
            if (e.target.files?.length) addFiles(e.target.files);
            e.target.value = '';
          }}
        />
      </div>

      {items.length ? (
        <ul className="flex flex-col gap-2">
          {items.map((it) => (
            <UploadCard key={it.key} item={it} update={update} onQueue={queue} onRemove={() => setItems((l) => l.filter((x) => x.key !== it.key))} />
          ))}
        </ul>
      ) : null}

      {items.length ? (
        <div className="flex items-center gap-3">
          <Button type="button" onClick={uploadAll} disabled={busy || pendingCount === 0} data-testid="upload-start">
            {busy ? 'Uploading…' : `Upload ${pendingCount} run${pendingCount === 1 ? '' : 's'}`}
          </Button>
          {invalidCount ? <p className="text-xs text-alarm">{invalidCount} file{invalidCount === 1 ? '' : 's'} need a valid subject label first.</p> : null}
        </div>
      ) : null}
    </div>
  );
}

const PHASE_TEXT: Record<Phase, string> = {
  pending: 'Ready to upload',
  uploading: 'Uploading',
  attaching: 'Attaching mask and motion file',
  queued: 'Uploaded — queued for decomposition',
  refused: 'Refused',
  attention: 'Uploaded — needs attention',
};

function UploadCard({ item, update, onQueue, onRemove }: { item: Item; update: (key: string, patch: Partial<Item>) => void; onQueue: (item: Item, runId: number) => Promise<void>; onRemove: () => void }) {
  const editable = item.phase === 'pending';
  const errors = entityErrors(item.entities);
  const id = (f: string) => `upload-${item.key}-${f}`;
  return (
    <li className="rounded border border-line bg-ground-sunken p-3 text-sm" data-testid="upload-item" data-file={item.file.name}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <p className="font-mono text-xs">{item.file.name} <span className="text-ink-faint">({formatBytes(item.file.size)})</span></p>
        <p data-testid="upload-status" data-phase={item.phase} className={item.phase === 'refused' ? 'text-alarm' : 'text-ink-muted'}>
          {PHASE_TEXT[item.phase]}
        </p>
      </div>
      {editable ? (
        <div className="mt-2 flex flex-wrap items-start gap-2">
          {ENTITY_FIELDS.map((f) => (
            <div key={f.key} className="flex flex-col">
              <label htmlFor={id(f.key)} className="text-xs text-ink-faint">{f.label}</label>
              <input
                id={id(f.key)}
                value={item.entities[f.key]}
                onChange={(e) => update(item.key, { entities: { ...item.entities, [f.key]: e.target.value } })}
                aria-invalid={errors[f.key] ? true : undefined}
                aria-describedby={errors[f.key] ? id(`${f.key}-error`) : undefined}
                className={`w-24 rounded border bg-ground px-2 py-1 font-mono text-xs ${errors[f.key] ? 'border-alarm' : 'border-line-strong'}`}
                data-testid={`entity-${f.key}`}
              />
              {errors[f.key] ? <p id={id(`${f.key}-error`)} className="max-w-48 text-xs text-alarm">{errors[f.key]}</p> : null}
            </div>
          ))}
          <div className="flex flex-col">
            <label htmlFor={id('mask')} className="text-xs text-ink-faint">Brain mask (optional)</label>
            <input id={id('mask')} type="file" accept=".nii,.gz" className="text-xs" onChange={(e) => update(item.key, { mask: e.target.files?.[0] ?? null })} />
          </div>
          <div className="flex flex-col gap-1">
            <label htmlFor={id('motion')} className="text-xs text-ink-faint">Motion parameters (optional; translations in mm)</label>
            <input id={id('motion')} type="file" accept=".tsv,.txt,.csv,.par" className="text-xs" onChange={(e) => update(item.key, { motion: e.target.files?.[0] ?? null })} />
            {item.motion ? (
              <div className="flex gap-2">
                <select aria-label="Motion column order" value={item.motionOrder} onChange={(e) => update(item.key, { motionOrder: e.target.value as Item['motionOrder'] })} className="rounded border border-line-strong bg-ground px-1 text-xs">
                  {MOTION_ORDERS.map((o) => (
                    <option key={o} value={o}>{MOTION_ORDER_NAMES[o]}</option>
                  ))}
                </select>
                <select aria-label="Rotation units" value={item.motionUnits} onChange={(e) => update(item.key, { motionUnits: e.target.value as Item['motionUnits'] })} className="rounded border border-line-strong bg-ground px-1 text-xs">
                  <option value="radians">rotations in radians</option>
                  <option value="degrees">rotations in degrees</option>
                </select>
              </div>
            ) : null}
          </div>
          <Button type="button" variant="quiet" onClick={onRemove} className="ml-auto">Remove</Button>
        </div>
      ) : (
        <p className="mt-1 font-mono text-xs text-ink-faint">{bidsName({ sub: item.entities.sub || '?', ses: item.entities.ses, task: item.entities.task, acq: item.entities.acq, runLabel: item.entities.run })}</p>
      )}
      {item.phase !== 'pending' && item.phase !== 'refused' ? (
        <div className="mt-2 h-1.5 w-full overflow-hidden rounded bg-ground-raised" role="progressbar" aria-label={`Upload of ${item.file.name}`} aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(item.progress * 100)} data-testid="upload-progress">
          <div className="h-full bg-lumen transition-all" style={{ width: `${Math.round(item.progress * 100)}%` }} />
        </div>
      ) : null}
      {item.message ? (
        <p className="mt-2 text-xs text-alarm" role="alert" data-testid="upload-error">{item.message}</p>
      ) : null}
      {item.phase === 'attention' && item.runId ? (
        <Button type="button" variant="quiet" className="mt-2" onClick={() => onQueue(item, item.runId!)}>Start decomposition without it</Button>
      ) : null}
      {item.phase === 'refused' ? <Button type="button" variant="quiet" className="mt-2" onClick={onRemove}>Dismiss</Button> : null}
    </li>
  );
}
