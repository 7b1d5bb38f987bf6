import type { Metadata } from 'next';
import localFont from 'next/font/local';
import { connection } from 'next/server';
import { CautionFooter } from '@/components/layout/caution-footer';
import './globals.css';

const sans = localFont({
  variable: '--font-sans',
  display: 'swap',
  src: [
    { path: './fonts/inter-latin-400-normal.woff2', weight: '400' },
    { path: './fonts/inter-latin-500-normal.woff2', weight: '500' },
    { path: './fonts/inter-latin-600-normal.woff2', weight: '600' },
    { path: './fonts/inter-latin-700-normal.woff2', weight: '700' },
  ],
});

const mono = localFont({
  variable: '--font-mono',
  display: 'swap',
  src: [
    { path: './fonts/jetbrains-mono-latin-400-normal.woff2', weight: '400' },
    { path: './fonts/jetbrains-mono-latin-500-normal.woff2', weight: '500' },
  ],
});

export const metadata: Metadata = {
  title: { default: 'Quorum', template: '%s · Quorum' },
  description: 'Multi-rater classification of fMRI independent components for imaging core facilities.',
};

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // every page renders per request: its scripts carry that request's CSP nonce (proxy.ts)
  await connection();
  return (
    <html lang="en" className={`${sans.variable} ${mono.variable}`}>
      <body className="flex min-h-screen flex-col">
        <div className="flex flex-1 flex-col">{children}</div>
        <CautionFooter />
      </body>
    </html>
  );
}
