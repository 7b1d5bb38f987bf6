export function Panel({
  title,
  children,
  className = '',
  actions,
}: {
  title?: string;
  children: React.ReactNode;
  className?: string;
  actions?: React.ReactNode;
}) {
  return (
    <section className={`rounded-lg border border-line bg-ground-raised ${className}`}>
      {title ? (
        <header className="flex items-center justify-between border-b border-line px-4 py-2">
          <h2 className="text-sm font-semibold tracking-wide text-ink">{title}</h2>
          {actions}
        </header>
      ) : null}
      <div className="p-4">{children}</div>
    </section>
  );
}
