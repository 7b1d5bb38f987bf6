export default function StudiesLoading() {
  return (
    <div className="flex flex-col gap-4" aria-busy="true" aria-label="Loading">
      <div className="h-6 w-56 animate-pulse rounded bg-ground-raised" />
      <div className="h-16 animate-pulse rounded bg-ground-raised" />
      <div className="h-64 animate-pulse rounded bg-ground-raised" />
    </div>
  );
}
