'use client';

import { useState } from 'react';
import type { StoredMail } from '@/lib/mail/mailbox';

/** Message list with the selected message's plain text (links are clickable). */
export function MailboxList({ messages }: { messages: StoredMail[] }) {
  const [open, setOpen] = useState<string | null>(messages[0]?.id ?? null);
  if (messages.length === 0) return <p className="text-sm text-ink-muted">No messages yet.</p>;
  const current = messages.find((m) => m.id === open);
  return (
    <div className="grid gap-4 md:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
      <ul className="divide-y divide-line text-sm" data-testid="mailbox-list">
        {messages.map((m) => (
          <li key={m.id}>
            <button
              type="button"
              onClick={() => setOpen(m.id)}
              className={`w-full px-2 py-2 text-left hover:bg-ground ${m.id === open ? 'bg-ground' : ''}`}
              data-testid="mailbox-item"
            >
              <span className="block truncate text-ink">{m.subject}</span>
              <span className="block truncate text-xs text-ink-faint">
                {m.to.join(', ')} · {m.date.replace('T', ' ').slice(0, 19)} UTC
              </span>
            </button>
          </li>
        ))}
      </ul>
      {current ? (
        <article className="rounded border border-line bg-ground-sunken p-3 text-sm" data-testid="mailbox-message">
          <p className="text-ink-faint">From {current.from}</p>
          <p className="text-ink-faint">To {current.to.join(', ')}</p>
          <h2 className="my-2 font-semibold">{current.subject}</h2>
          <pre className="whitespace-pre-wrap break-words font-sans text-ink-muted">
            {current.text.split(/(https?:\/\/\S+)/g).map((part, i) =>
              /^https?:\/\//.test(part) ? (
                <a key={i} href={part} className="text-lumen hover:text-lumen-strong">
                  {part}
                </a>
              ) : (
                part
              ),
            )}
          </pre>
        </article>
      ) : null}
    </div>
  );
}
