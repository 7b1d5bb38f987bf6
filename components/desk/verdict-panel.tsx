'use client';
import { forwardRef, useEffect, useState } from 'react';
import { labelKeys } from '@/lib/desk/keys';
import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
import type { VoteFields } from '@/lib/desk/types';
import type { ShownVote } from '@/lib/desk/use-vote';

const TONE: Record<string, string> = {
  signal: 'border-verdict-signal text-verdict-signal',
  noise: 'border-verdict-noise text-verdict-noise',
  uncertain: 'border-verdict-uncertain text-verdict-uncertain',
};
const ON: Record<string, string> = {
  signal: 'bg-verdict-signal text-ground border-verdict-signal',
  noise: 'bg-verdict-noise text-ground border-verdict-noise',
  uncertain: 'bg-verdict-uncertain text-ground border-verdict-uncertain',
};

type Props = {
  vote: ShownVote | undefined;
  labelSet: string[];
  noiseKinds: string[];
  disabled: boolean;
  onChange: (fields: Partial<VoteFields>) => void;
  onNoteDone: () => void;
};

/** Label, noise kind, confidence and note of the current component — every control also on a key. */
export const VerdictPanel = forwardRef<HTMLTextAreaElement, Props>(function VerdictPanel(
  { vote, labelSet, noiseKinds, disabled, onChange, onNoteDone },
  noteRef,
) {
  const keys = labelKeys(labelSet);
  const [note, setNote] = useState(vote?.note ?? '');
  const stored = vote?.note ?? '';
  useEffect(() => setNote(stored), [stored, vote?.componentId]);
  const commitNote = () => {
    if ((note.trim() || null) !== (stored.trim() || null)) onChange({ note: note.trim() ? note : null });
  };
  return (
    <section aria-labelledby="verdict-heading" className="rounded border border-line bg-ground-raised p-3" data-testid="verdict-panel">
      <h2 id="verdict-heading" className="sr-only">
        Your vote
      </h2>
      <div className="grid grid-cols-3 gap-1.5" role="group" aria-label="Label">
        {labelSet.map((l) => {
          const on = vote?.label === l;
          return (
            <button
              key={l}
              type="button"
              disabled={disabled}
              aria-pressed={on}
              data-testid={`label-${l}`}
              onClick={() => onChange(l === 'noise' ? { label: l } : { label: l, noiseKind: null })}
              className={`rounded border px-2 py-1.5 text-sm font-medium transition-colors disabled:opacity-50 ${on ? (ON[l] ?? 'bg-ink text-ground') : `${TONE[l] ?? 'border-line-strong text-ink'} hover:bg-ground-sunken`}`}
            >
              {labelName(l)} {keys[l] ? <kbd className="ml-1 font-mono text-[10px]">{keys[l].toUpperCase()}</kbd> : null}
            </button>
          );
        })}
      </div>
      <div className="mt-3" role="group" aria-label="Noise kind">
        <p className="mb-1 text-[11px] uppercase tracking-wider text-ink-muted">Noise kind</p>
        <div className="grid grid-cols-2 gap-1">
          {noiseKinds.map((k, i) => {
            const on = vote?.label === 'noise' && vote?.noiseKind === k;
            return (
              <button
                key={k}
                type="button"
                disabled={disabled}
                aria-pressed={on}
                data-testid={`kind-${k}`}
                onClick={() => onChange({ label: 'noise', noiseKind: k })}
                className={`flex items-center gap-1.5 rounded border px-2 py-1 text-left text-xs disabled:opacity-50 ${on ? 'border-verdict-noise bg-verdict-noise/15 text-ink' : 'border-line text-ink-muted hover:bg-ground-sunken'}`}
              >
                <kbd className="font-mono text-[10px] text-ink-muted">{i + 1}</kbd>
                <span className="truncate">{noiseKindName(k)}</span>
              </button>
            );
          })}
        </div>
      </div>
      <div className="mt-3 flex items-center gap-2" role="group" aria-label="Confidence">
        <p className="text-[11px] uppercase tracking-wider text-ink-muted">Confidence</p>
        {[1, 2, 3, 4, 5].map((c) => (
          <button
            key={c}
            type="button"
            disabled={disabled || !vote?.label}
            aria-pressed={vote?.confidence === c}
            aria-label={`Confidence ${c} of 5`}
            data-testid={`confidence-${c}`}
            onClick={() => onChange({ confidence: vote?.confidence === c ? null : c })}
            className={`h-6 w-6 rounded border font-mono text-xs disabled:opacity-40 ${vote?.confidence === c ? 'border-ink bg-ink text-ground' : 'border-line text-ink-muted hover:bg-ground-sunken'}`}
          >
            {c}
          </button>
        ))}
      </div>
      <label className="mt-3 block text-[11px] uppercase tracking-wider text-ink-muted" htmlFor="vote-note">
        Note <span className="normal-case tracking-normal">(E)</span>
      </label>
      <textarea
        id="vote-note"
        ref={noteRef}
        rows={2}
        disabled={disabled || !vote?.label}
        value={note}
        maxLength={2000}
        data-testid="vote-note"
        placeholder={vote?.label ? 'What you saw, for the lead' : 'Label the component first'}
        onChange={(e) => setNote(e.target.value)}
        onBlur={commitNote}
        onKeyDown={(e) => {
          if (e.key === 'Escape' || ((e.ctrlKey || e.metaKey) && e.key === 'Enter')) {
            e.preventDefault();
            e.stopPropagation();
            commitNote();
            onNoteDone();
          }
        }}
        className="mt-1 w-full resize-none rounded border border-line-strong bg-ground-sunken px-2 py-1 text-sm text-ink placeholder:text-ink-faint disabled:opacity-50"
      />
    </section>
  );
});
