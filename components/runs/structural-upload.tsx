'use client';
import { useId, useState } from 'react';
import { useRouter } from 'next/navigation';
import { sendFile } from './upload-request';
import { Notice } from '@/components/ui/notice';
import { MAX_STRUCTURAL_BYTES, formatBytes } from '@/lib/runs/schema';

/**
 * For a study lead in the read-only run view: attach (or replace) the run's structural underlay —
 * one 3D NIfTI image already on the run's grid. The server refuses any other grid with what differs.
 */
export function StructuralUpload({ runId, current }: { runId: number; current: string | null }) {
  const id = useId();
  const router = useRouter();
  const [state, setState] = useState<{ busy: boolean; kind: 'ok' | 'error' | null; message: string | null }>({
    busy: false,
    kind: null,
    message: null,
  });
  const upload = async (file: File) => {
    setState({ busy: true, kind: null, message: null });
    const res = await sendFile<{ structuralName: string }>(
      'PUT',
      `/api/runs/${runId}/structural?${new URLSearchParams({ name: file.name.slice(0, 200) })}`,
      file,
    );
    if (res.ok) {
      setState({ busy: false, kind: 'ok', message: `${res.data.structuralName} is the run's structural underlay now.` });
      router.refresh();
    } else setState({ busy: false, kind: 'error', message: res.message });
  };
  return (
    <section
      className="flex flex-col gap-2 rounded border border-line bg-ground-raised p-3 text-xs text-ink-muted"
      aria-labelledby={`${id}-h`}
      data-testid="structural-upload"
    >
      <h2 id={`${id}-h`} className="font-semibold uppercase tracking-wider">
        Structural underlay
      </h2>
      <p data-testid="structural-current">{current ? `Attached: ${current}` : 'None: the desk shows the mean image.'}</p>
      <label htmlFor={`${id}-file`}>
        One 3D NIfTI image on this run&apos;s grid (same dimensions and voxel-to-world transform), at most{' '}
        {formatBytes(MAX_STRUCTURAL_BYTES)}
      </label>
      <input
        id={`${id}-file`}
        type="file"
        accept=".nii,.gz"
        disabled={state.busy}
        data-testid="structural-file"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void upload(f);
          e.target.value = '';
        }}
        className="text-xs"
      />
      {state.busy ? <p role="status">Uploading…</p> : null}
      {state.message && state.kind ? (
        <Notice kind={state.kind} testId="structural-message">
          {state.message}
        </Notice>
      ) : null}
    </section>
  );
}
