import Link from 'next/link';

export default function StudyNotFound() {
  return (
    <div className="flex flex-col gap-3">
      <h1 className="text-lg font-semibold">No such study</h1>
      <p className="text-sm text-ink-muted">The study does not exist, or you are not a member of it. Ask its lead to add you.</p>
      <Link href="/studies" className="text-sm text-lumen hover:text-lumen-strong">
        All your studies
      </Link>
    </div>
  );
}
