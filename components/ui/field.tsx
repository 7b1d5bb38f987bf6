import { forwardRef, type InputHTMLAttributes } from 'react';

type FieldProps = InputHTMLAttributes<HTMLInputElement> & {
  label: string;
  name: string;
  error?: string;
  hint?: string;
};

/** A labelled input whose error is announced and tied to it with aria-describedby. */
export const Field = forwardRef<HTMLInputElement, FieldProps>(function Field(
  { label, name, error, hint, id, className = '', ...props },
  ref,
) {
  const inputId = id ?? `field-${name}`;
  const describedBy = [error ? `${inputId}-error` : null, hint ? `${inputId}-hint` : null].filter(Boolean).join(' ');
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={inputId} className="text-sm text-ink-muted">
        {label}
      </label>
      <input
        ref={ref}
        id={inputId}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy || undefined}
        className={`rounded border bg-ground-sunken px-3 py-2 text-sm text-ink placeholder:text-ink-faint ${error ? 'border-alarm' : 'border-line-strong'} ${className}`}
        {...props}
      />
      {hint && !error ? (
        <p id={`${inputId}-hint`} className="text-xs text-ink-faint">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${inputId}-error`} className="text-xs text-alarm" data-testid={`${name}-error`}>
          {error}
        </p>
      ) : null}
    </div>
  );
});
