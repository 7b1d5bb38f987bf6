'use client';

import { useCallback, useLayoutEffect, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { parseBidsName, bidsName } from '@/lib/bids';
import { groupDroppedFiles } from '@/lib/runs/folder-files';
import type { RunListItem } from '@/lib/db/queries/runs';
import { fileNameProblem, formatBytes, MOTION_ORDER_NAMES, MOTION_ORDERS, runEntitiesSchema } from '@/lib/runs/schema';
import { postJson } from '@/lib/api/client';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
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
  /** The run's JSON sidecar found beside it in a dropped folder (shown; the header is what counts). */
  sidecar: File | null;
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

/** The files in a dropped item: a folder is walked (all levels), a file is itself. */
async function filesOfEntry(entry: FileSystemEntry): Promise<File[]> {
  if (entry.isFile)
    return new Promise((resolve) =>
      (entry as FileSystemFileEntry).file(
        (f) => resolve([f]),
        () => resolve([]),
      ),
    );
  const reader = (entry as FileSystemDirectoryEntry).createReader();
  const children: FileSystemEntry[] = [];
  // readEntries answers in batches until it returns an empty one
  for (;;) {
    const batch = await new Promise<FileSystemEntry[]>((resolve) => reader.readEntries(resolve, () => resolve([])));
    if (!batch.length) break;
    children.push(...batch);
  }
  return (await Promise.all(children.map(filesOfEntry))).flat();
}

/** Stems already taken: the study's runs, and the cards before this one. */
function clashOf(
  item: Item,
  items: Item[],
  existing: Pick<RunListItem, 'id' | 'sub' | 'ses' | 'task' | 'acq' | 'runLabel' | 'originalName'>[],
): string | null {
  const stem = stemOf(item.entities);
  const run = existing.find((r) => bidsName(r) === stem);
  if (run)
    return `${stem} is already run #${run.id} of this study (uploaded as ${run.originalName}). Two runs with the same labels cannot both be released: change a label here, e.g. the run number.`;
  const earlier = items.slice(0, items.indexOf(item)).find((o) => o.phase === 'pending' && stemOf(o.entities) === stem);
  if (earlier) return `${stem} is also the labels of ${earlier.file.name} above. Change a label of one of them, e.g. the run number.`;
  return null;
}

const stemOf = (e: Entities) => bidsName({ sub: e.sub, ses: e.ses, task: e.task, acq: e.acq, runLabel: e.run });

/**
 * Drag-and-drop (or pick) one or many .nii/.nii.gz runs, or a whole BIDS folder; each run gets its own card with the BIDS
 * entities parsed from its name (editable), an optional mask and motion table, and a progress bar.
 * One file per request: the run (POST /api/studies/:id/runs), then its attachments
 * (PUT /api/runs/:id/mask|motion), then POST /api/runs/:id/queue. A refused file shows its message;
 * the others go on. A dropped folder is sorted by name (lib/runs/folder-files.ts): each run with its
 * motion table, mask and sidecar; what is not a run is left out and listed in one line. Labels that
 * another run (or another card) already has are flagged on the card and confirmed before upload.
 */
export function UploadArea({ studyId, maxBytes, existing = [] }: { studyId: number; maxBytes: number; existing?: RunListItem[] }) {
  const client = useQueryClient();
  const [items, setItems] = useState<Item[]>([]);
  const [dragging, setDragging] = useState(false);
  const [busy, setBusy] = useState(false);
  const [ignored, setIgnored] = useState<string[]>([]);
  const [confirmClash, setConfirmClash] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const folderInput = useRef<HTMLInputElement>(null);
  const itemsRef = useRef<Item[]>([]);
  useLayoutEffect(() => {
    itemsRef.current = items;
  });

  const update = useCallback((key: string, patch: Partial<Item>) => {
    setItems((list) => list.map((it) => (it.key === key ? { ...it, ...patch } : it)));
  }, []);

  const addFiles = (files: FileList | File[]) => {
    const grouped = groupDroppedFiles([...files]);
    setIgnored(grouped.ignored.map((f) => f.name));
    const added: Item[] = grouped.runs.map(({ file, motion, mask, sidecar }, i) => {
      const parsed = parseBidsName(file.name);
      const problem =
        fileNameProblem(file.name, 'image') ??
        (file.size > maxBytes
          ? `The file is ${formatBytes(file.size)}, over this facility's upload limit of ${formatBytes(maxBytes)}.`
          : null);
      return {
        key: `${Date.now()}-${i}-${file.name}`,
        file,
        entities: {
          sub: parsed?.sub ?? '',
          ses: parsed?.ses ?? '',
          task: parsed?.task ?? '',
          acq: parsed?.acq ?? '',
          run: parsed?.runLabel ?? '',
        },
        mask,
        motion,
        sidecar,
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
    const result = await sendFile<{ run: { id: number } }>('POST', `/api/studies/${studyId}/runs?${params}`, item.file, (f) =>
      update(item.key, { progress: f }),
    );
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

  const ready = () => itemsRef.current.filter((it) => it.phase === 'pending' && Object.keys(entityErrors(it.entities)).length === 0);
  const clashes = items.filter((it) => it.phase === 'pending' && clashOf(it, items, existing));

  const askThenUpload = () => {
    if (ready().some((it) => clashOf(it, itemsRef.current, existing))) setConfirmClash(true);
    else void uploadAll();
  };

  const uploadAll = async () => {
    setConfirmClash(false);
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
          const entries = [...e.dataTransfer.items].map((it) => it.webkitGetAsEntry?.()).filter((x): x is FileSystemEntry => Boolean(x));
          if (entries.some((x) => x.isDirectory)) void Promise.all(entries.map(filesOfEntry)).then((lists) => addFiles(lists.flat()));
          else if (e.dataTransfer.files.length) addFiles(e.dataTransfer.files);
        }}
        className={`flex flex-col items-center gap-2 rounded-lg border-2 border-dashed px-4 py-6 text-sm ${dragging ? 'border-lumen bg-lumen/10' : 'border-line-strong'}`}
        data-testid="upload-drop"
      >
        <p>Drop preprocessed 4D runs here (.nii or .nii.gz), one or many at once, or a whole BIDS folder.</p>
        <p className="text-xs text-ink-faint">
          BIDS entities are read from each file name; check them before uploading. In a folder, each run&apos;s motion table and mask are
          found by name. Limit {formatBytes(maxBytes)} per file.
        </p>
        <div className="flex gap-2">
          <Button type="button" variant="quiet" onClick={() => input.current?.click()}>
            Choose files…
          </Button>
          <Button type="button" variant="quiet" onClick={() => folderInput.current?.click()}>
            Choose a folder…
          </Button>
        </div>
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
        <input
          ref={folderInput}
          type="file"
          {...{ webkitdirectory: '' }}
          multiple
          className="sr-only"
          aria-label="Choose a folder of runs"
          data-testid="upload-folder-input"
          onChange={(e) => {
            if (e.target.files?.length) addFiles(e.target.files);
            e.target.value = '';
          }}
        />
      </div>

      {ignored.length ? (
        <p className="truncate text-xs text-ink-faint" title={ignored.join('\n')} data-testid="upload-ignored">
          Not runs, left out ({ignored.length} file{ignored.length === 1 ? '' : 's'}): {ignored.join(', ')}
        </p>
      ) : null}

      {items.length ? (
        <ul className="flex flex-col gap-2">
          {items.map((it) => (
            <UploadCard
              key={it.key}
              item={it}
              clash={it.phase === 'pending' ? clashOf(it, items, existing) : null}
              update={update}
              onQueue={queue}
              onRemove={() => setItems((l) => l.filter((x) => x.key !== it.key))}
            />
          ))}
        </ul>
      ) : null}

      {items.length ? (
        <div className="flex items-center gap-3">
          <Button type="button" onClick={askThenUpload} disabled={busy || pendingCount === 0} data-testid="upload-start">
            {busy ? 'Uploading…' : `Upload ${pendingCount} run${pendingCount === 1 ? '' : 's'}`}
          </Button>
          {invalidCount ? (
            <p className="text-xs text-alarm">
              {invalidCount} file{invalidCount === 1 ? '' : 's'} need a valid subject label first.
            </p>
          ) : null}
        </div>
      ) : null}
      <ConfirmDialog
        open={confirmClash}
        title="Upload runs whose labels are taken?"
        confirmLabel="Upload anyway"
        cancelLabel="Go back and change the labels"
        onConfirm={() => void uploadAll()}
        onCancel={() => setConfirmClash(false)}
        testId="upload-clash-confirm"
      >
        <p>
          {clashes.length} run{clashes.length === 1 ? ' has' : 's have'} the same BIDS labels as another run:{' '}
          {clashes.map((it) => stemOf(it.entities)).join(', ')}.
        </p>
        <p>
          Their released files would share names, so the study cannot be released until a lead changes the labels of one of them (Labels… in
          the runs table).
        </p>
      </ConfirmDialog>
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

function UploadCard({
  item,
  clash,
  update,
  onQueue,
  onRemove,
}: {
  item: Item;
  clash: string | null;
  update: (key: string, patch: Partial<Item>) => void;
  onQueue: (item: Item, runId: number) => Promise<void>;
  onRemove: () => void;
}) {
  const editable = item.phase === 'pending';
  const errors = entityErrors(item.entities);
  const id = (f: string) => `upload-${item.key}-${f}`;
  return (
    <li className="rounded border border-line bg-ground-sunken p-3 text-sm" data-testid="upload-item" data-file={item.file.name}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <p className="font-mono text-xs">
          {item.file.name} <span className="text-ink-faint">({formatBytes(item.file.size)})</span>
        </p>
        <p data-testid="upload-status" data-phase={item.phase} className={item.phase === 'refused' ? 'text-alarm' : 'text-ink-muted'}>
          {PHASE_TEXT[item.phase]}
        </p>
      </div>
      {editable ? (
        <div className="mt-2 flex flex-wrap items-start gap-2">
          {ENTITY_FIELDS.map((f) => (
            <div key={f.key} className="flex flex-col">
              <label htmlFor={id(f.key)} className="text-xs text-ink-faint">
                {f.label}
              </label>
              <input
                id={id(f.key)}
                value={item.entities[f.key]}
                onChange={(e) => update(item.key, { entities: { ...item.entities, [f.key]: e.target.value } })}
                aria-invalid={errors[f.key] ? true : undefined}
                aria-describedby={errors[f.key] ? id(`${f.key}-error`) : undefined}
                className={`w-24 rounded border bg-ground px-2 py-1 font-mono text-xs ${errors[f.key] ? 'border-alarm' : 'border-line-strong'}`}
                data-testid={`entity-${f.key}`}
              />
              {errors[f.key] ? (
                <p id={id(`${f.key}-error`)} className="max-w-48 text-xs text-alarm">
                  {errors[f.key]}
                </p>
              ) : null}
            </div>
          ))}
          <div className="flex flex-col">
            <label htmlFor={id('mask')} className="text-xs text-ink-faint">
              Brain mask (optional)
            </label>
            <input
              id={id('mask')}
              type="file"
              accept=".nii,.gz"
              className="text-xs"
              onChange={(e) => update(item.key, { mask: e.target.files?.[0] ?? null })}
            />
          </div>
          <div className="flex flex-col gap-1">
            <label htmlFor={id('motion')} className="text-xs text-ink-faint">
              Motion parameters (optional; translations in mm)
            </label>
            <input
              id={id('motion')}
              type="file"
              accept=".tsv,.txt,.csv,.par"
              className="text-xs"
              onChange={(e) => update(item.key, { motion: e.target.files?.[0] ?? null })}
            />
            {item.motion ? (
              <div className="flex gap-2">
                <select
                  aria-label="Motion column order"
                  value={item.motionOrder}
                  onChange={(e) => update(item.key, { motionOrder: e.target.value as Item['motionOrder'] })}
                  className="rounded border border-line-strong bg-ground px-1 text-xs"
                >
                  {MOTION_ORDERS.map((o) => (
                    <option key={o} value={o}>
                      {MOTION_ORDER_NAMES[o]}
                    </option>
                  ))}
                </select>
                <select
                  aria-label="Rotation units"
                  value={item.motionUnits}
                  onChange={(e) => update(item.key, { motionUnits: e.target.value as Item['motionUnits'] })}
                  className="rounded border border-line-strong bg-ground px-1 text-xs"
                >
                  <option value="radians">rotations in radians</option>
                  <option value="degrees">rotations in degrees</option>
                </select>
              </div>
            ) : null}
          </div>
          <Button type="button" variant="quiet" onClick={onRemove} className="ml-auto">
            Remove
          </Button>
        </div>
      ) : (
        <p className="mt-1 font-mono text-xs text-ink-faint">
          {bidsName({
            sub: item.entities.sub || '?',
            ses: item.entities.ses,
            task: item.entities.task,
            acq: item.entities.acq,
            runLabel: item.entities.run,
          })}
        </p>
      )}
      {item.phase !== 'pending' && item.phase !== 'refused' ? (
        <div
          className="mt-2 h-1.5 w-full overflow-hidden rounded bg-ground-raised"
          role="progressbar"
          aria-label={`Upload of ${item.file.name}`}
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={Math.round(item.progress * 100)}
          data-testid="upload-progress"
        >
          <div className="h-full bg-lumen transition-all" style={{ width: `${Math.round(item.progress * 100)}%` }} />
        </div>
      ) : null}
      {editable && (item.motion || item.mask || item.sidecar) ? (
        <p className="mt-1 text-xs text-ink-faint" data-testid="upload-companions">
          Found beside it:{' '}
          {[
            item.motion ? `motion table ${item.motion.name}` : null,
            item.mask ? `mask ${item.mask.name}` : null,
            item.sidecar ? `sidecar ${item.sidecar.name}` : null,
          ]
            .filter(Boolean)
            .join('; ')}
        </p>
      ) : null}
      {clash ? (
        <p className="mt-2 text-xs text-alarm" role="status" data-testid="upload-duplicate">
          {clash}
        </p>
      ) : null}
      {item.message ? (
        <p className="mt-2 text-xs text-alarm" role="alert" data-testid="upload-error">
          {item.message}
        </p>
      ) : null}
      {item.phase === 'attention' && item.runId ? (
        <Button type="button" variant="quiet" className="mt-2" onClick={() => onQueue(item, item.runId!)}>
          Start decomposition without it
        </Button>
      ) : null}
      {item.phase === 'refused' ? (
        <Button type="button" variant="quiet" className="mt-2" onClick={onRemove}>
          Dismiss
        </Button>
      ) : null}
    </li>
  );
}
