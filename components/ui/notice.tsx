/** An inline message box; kind "error" is announced to screen readers. */
export function Notice({
  kind = 'info',
  children,
  testId,
}: {
  kind?: 'info' | 'error' | 'ok';
  children: React.ReactNode;
  testId?: string;
}) {
  const tone =
    kind === 'error'
      ? 'border-alarm/60 bg-alarm/10 text-alarm'
      : kind === 'ok'
        ? 'border-lumen/50 bg-lumen/10 text-lumen-strong'
        : 'border-line bg-ground-sunken text-ink-muted';
  return (
    <div role={kind === 'error' ? 'alert' : 'status'} data-testid={testId} className={`rounded border px-3 py-2 text-sm ${tone}`}>
      {children}
    </div>
  );
}
