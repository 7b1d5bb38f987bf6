'use client';
import { useEffect, useRef } from 'react';
import { helpRows } from '@/lib/desk/keys';
import { labelName, noiseKindName } from '@/lib/vocabulary/protocol';

/** The keyboard help (?), a modal dialog generated from the desk's key map. */
export function HelpOverlay({
  labelSet,
  noiseKinds,
  onClose,
  readOnly = false,
}: {
  labelSet: string[];
  noiseKinds: string[];
  onClose: () => void;
  readOnly?: boolean;
}) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => ref.current?.focus(), []);
  return (
    <div className="fixed inset-0 z-50 flex items-center justify-center bg-ground-sunken/80 p-6" onClick={onClose}>
      <div
        ref={ref}
        role="dialog"
        aria-modal="true"
        aria-labelledby="desk-help-title"
        tabIndex={-1}
        data-testid="help-overlay"
        className="max-h-full w-full max-w-3xl overflow-auto rounded-lg border border-line-strong bg-ground-raised p-5 shadow-2xl"
        onClick={(e) => e.stopPropagation()}
      >
        <div className="mb-3 flex items-baseline justify-between">
          <h2 id="desk-help-title" className="text-base font-semibold">
            Desk keys
          </h2>
          <button type="button" onClick={onClose} className="text-xs text-ink-muted hover:text-ink">
            Close (Esc)
          </button>
        </div>
        <div className="grid gap-5 sm:grid-cols-2">
          {helpRows(labelSet, noiseKinds, { label: labelName, kind: noiseKindName }, readOnly).map((g) => (
            <section key={g.group}>
              <h3 className="mb-1 text-xs font-semibold uppercase tracking-wider text-ink-muted">{g.group}</h3>
              <table className="w-full text-sm">
                <tbody>
                  {g.rows.map((r) => (
                    <tr key={r.does}>
                      <td className="w-28 py-0.5 pr-2 align-top">
                        {r.keys.map((k) => (
                          <kbd
                            key={k}
                            className="mr-1 inline-block min-w-6 rounded border border-line-strong bg-ground-sunken px-1.5 text-center font-mono text-xs text-ink"
                          >
                            {k}
                          </kbd>
                        ))}
                      </td>
                      <td className="py-0.5 text-ink-muted">{r.does}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </section>
          ))}
        </div>
      </div>
    </div>
  );
}
