'use client';
import { useEffect, useRef, useState } from 'react';

/**
 * "Go to component N" (G): a small field that takes the component number and Enter; Esc closes it.
 * `go` answers null when it went there, else the message to show.
 */
export function GoToBox({ go, onClose, k }: { go: (n: number) => string | null; onClose: () => void; k: number }) {
  const [text, setText] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const ref = useRef<HTMLInputElement>(null);
  useEffect(() => ref.current?.focus(), []);
  return (
    <form
      className="flex items-center gap-2 rounded border border-lumen bg-ground-raised px-2 py-1 text-xs"
      data-testid="go-to-box"
      onSubmit={(e) => {
        e.preventDefault();
        const n = Number(text);
        if (!/^\d+$/.test(text.trim()) || n < 1 || n > k) return setMessage(`Type a component number from 1 to ${k}.`);
        const refusal = go(n);
        if (refusal) setMessage(refusal);
        else onClose();
      }}
    >
      <label htmlFor="go-to-input" className="text-ink-muted">
        Go to component
      </label>
      <input
        id="go-to-input"
        ref={ref}
        value={text}
        inputMode="numeric"
        autoComplete="off"
        onChange={(e) => setText(e.target.value.replace(/[^0-9]/g, ''))}
        onKeyDown={(e) => {
          if (e.key === 'Escape') onClose();
        }}
        onBlur={onClose}
        className="w-14 rounded border border-line-strong bg-ground px-1 font-mono text-ink"
        data-testid="go-to-input"
      />
      <span className="text-ink-muted">Enter · Esc</span>
      {message ? (
        <span role="alert" className="text-alarm" data-testid="go-to-message">
          {message}
        </span>
      ) : null}
    </form>
  );
}
