export default function Loading() {
  return (
    <div className="flex animate-pulse flex-col gap-3" aria-busy="true" aria-label="Loading the rating desk">
      <div className="h-6 w-1/2 rounded bg-ground-raised" />
      <div className="h-5 w-full rounded bg-ground-raised" />
      <div className="grid gap-3 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="flex flex-col gap-2">
          <div className="h-[26rem] rounded bg-ground-raised" />
          <div className="h-40 rounded bg-ground-raised" />
        </div>
        <div className="h-[34rem] rounded bg-ground-raised" />
      </div>
    </div>
  );
}
