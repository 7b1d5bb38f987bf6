'use client';
import { useRouter } from 'next/navigation';
import { useEffect } from 'react';

/** While the stored agreement report is being computed, reloads the page's server data every few seconds until it is current. */
export function RefreshWhileComputing({ everyMs = 3000 }: { everyMs?: number }) {
  const router = useRouter();
  useEffect(() => {
    const t = setInterval(() => router.refresh(), everyMs);
    return () => clearInterval(t);
  }, [router, everyMs]);
  return null;
}
