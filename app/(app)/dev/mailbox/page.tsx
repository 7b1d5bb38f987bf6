import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';
import { devMailboxEnabled, mailDir } from '@/lib/mail/config';
import { listMail } from '@/lib/mail/mailbox';
import { Panel } from '@/components/ui/panel';
import { MailboxList } from './mailbox-client';

export const metadata: Metadata = { title: 'Mailbox (development)' };
export const dynamic = 'force-dynamic';

// The messages caught by the local fake mail server. Development, tests and the demo only:
// 404 in production unless QUORUM_DEV_MAILBOX=1.
export default async function MailboxPage() {
  if (!devMailboxEnabled()) notFound();
  await requirePageUser('mailbox.read');
  const messages = (await listMail()).slice(0, 200);
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">Mailbox</h1>
      <Panel title={`${messages.length} messages caught by the local mail server`}>
        <p className="mb-4 text-xs text-ink-faint">Nothing here was delivered. Stored in {mailDir()}.</p>
        <MailboxList messages={messages} />
      </Panel>
    </div>
  );
}
