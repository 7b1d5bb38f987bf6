import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'quiet' | 'danger';

const styles: Record<Variant, string> = {
  primary: 'bg-lumen text-ground hover:bg-lumen-strong disabled:bg-lumen-deep disabled:text-ink-muted',
  quiet: 'border border-line-strong text-ink hover:bg-ground-raised disabled:text-ink-faint',
  danger: 'border border-alarm/60 text-alarm hover:bg-alarm/10',
};

export function Button({ variant = 'primary', className = '', ...props }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      {...props}
      className={`inline-flex items-center justify-center gap-2 rounded px-3 py-1.5 text-sm font-medium transition-colors disabled:cursor-not-allowed ${styles[variant]} ${className}`}
    />
  );
}
