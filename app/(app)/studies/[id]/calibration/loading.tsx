export default function Loading() {
  return (
    <div className="flex flex-col gap-4" aria-busy="true" aria-label="Loading the calibration set">
      <div className="h-6 w-48 animate-pulse rounded bg-ground-raised" />
      <div className="h-48 animate-pulse rounded-lg bg-ground-raised" />
      <div className="h-48 animate-pulse rounded-lg bg-ground-raised" />
    </div>
  );
}
