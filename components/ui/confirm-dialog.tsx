'use client';
import { useEffect, useId, useRef, type ReactNode } from 'react';
import { Button } from './button';

/**
 * A modal confirmation for an action that cannot be undone. Built on the native <dialog> element
 * opened with showModal(): the page behind is inert, focus stays inside, Escape cancels, and focus
 * returns to the button that opened it. The title and the consequences are the dialog's accessible
 * name and description. Focus starts on Cancel, so Enter pressed by habit does not confirm.
 */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = 'Cancel',
  danger = true,
  busy = false,
  onConfirm,
  onCancel,
  testId = 'confirm-dialog',
}: {
  open: boolean;
  title: string;
  children: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  danger?: boolean;
  busy?: boolean;
  onConfirm: () => void;
  onCancel: () => void;
  testId?: string;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const id = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) {
      dialog.showModal();
      dialog.querySelector<HTMLButtonElement>('[data-dialog-cancel]')?.focus();
    } else if (!open && dialog.open) {
      dialog.close();
    }
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={`${id}-title`}
      aria-describedby={`${id}-body`}
      onCancel={(e) => {
        e.preventDefault();
        if (!busy) onCancel();
      }}
      className="w-[min(32rem,calc(100vw-2rem))] rounded-lg border border-line-strong bg-ground-raised p-0 text-ink backdrop:bg-black/60"
      data-testid={testId}
    >
      {open ? (
        <div className="flex flex-col gap-3 p-4 text-sm">
          <h2 id={`${id}-title`} className="text-base font-semibold">
            {title}
          </h2>
          <div id={`${id}-body`} className="flex flex-col gap-2 text-ink-muted">
            {children}
          </div>
          <div className="mt-1 flex justify-end gap-2">
            <Button data-dialog-cancel type="button" variant="quiet" onClick={onCancel} disabled={busy} data-testid={`${testId}-cancel`}>
              {cancelLabel}
            </Button>
            <Button
              type="button"
              variant={danger ? 'danger' : 'primary'}
              onClick={onConfirm}
              disabled={busy}
              data-testid={`${testId}-confirm`}
            >
              {confirmLabel}
            </Button>
          </div>
        </div>
      ) : null}
    </dialog>
  );
}
