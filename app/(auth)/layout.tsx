export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <main className="flex flex-1 items-center justify-center px-4 py-16">
      <div className="w-full max-w-sm">
        <div className="mb-8 text-center">
          <p className="text-2xl font-semibold tracking-tight">
            Quorum<span className="text-lumen">.</span>
          </p>
          <p className="mt-1 text-sm text-ink-muted">Component rating for imaging core facilities</p>
        </div>
        {children}
      </div>
    </main>
  );
}
