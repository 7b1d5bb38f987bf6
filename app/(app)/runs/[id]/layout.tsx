import { QueryProvider } from '@/components/providers/query-provider';

export default function RunLayout({ children }: { children: React.ReactNode }) {
  return <QueryProvider>{children}</QueryProvider>;
}
