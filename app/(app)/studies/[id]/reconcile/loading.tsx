export default function Loading() {
  return (
    <div className="grid gap-4 lg:grid-cols-[16rem_1fr_22rem]" aria-busy="true" aria-label="Loading the reconcile queue">
      <div className="h-96 animate-pulse rounded bg-ground-raised" />
      <div className="h-96 animate-pulse rounded bg-ground-raised" />
      <div className="h-96 animate-pulse rounded bg-ground-raised" />
    </div>
  );
}
