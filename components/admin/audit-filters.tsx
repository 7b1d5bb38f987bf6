'use client';

import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { auditFilterSchema, type AuditFilterInput } from '@/lib/audit/schema';
import { Button } from '@/components/ui/button';

type Choices = { actions: string[]; actors: { id: number; name: string }[]; studies: { id: number; name: string }[] };
type Values = { actorId: string; action: string; studyId: string; from: string; to: string };

const input = 'rounded border bg-ground-sunken px-2 py-1 text-sm text-ink';

/** Filter form of the audit log: writes the filter into the address, the server page reads it. */
export function AuditFilters({ initial, choices }: { initial: Values; choices: Choices }) {
  const router = useRouter();
  const { register, handleSubmit, formState, reset } = useForm<Values>({
    resolver: zodResolver(auditFilterSchema as never) as never,
    defaultValues: initial,
  });
  const families = [...new Set(choices.actions.map((a) => a.split('.')[0]))].filter((f) => !choices.actions.includes(f));

  const onSubmit = handleSubmit(() => {
    // the resolver has checked the values; the address carries the raw strings
    const raw = (document.getElementById('audit-filters') as HTMLFormElement | null)?.elements;
    const q = new URLSearchParams();
    for (const name of ['actorId', 'action', 'studyId', 'from', 'to'] as const) {
      const el = raw?.namedItem(name) as HTMLInputElement | HTMLSelectElement | null;
      if (el?.value) q.set(name, el.value);
    }
    router.push(`/admin/audit${q.size ? `?${q}` : ''}`);
  });

  const err = (name: keyof AuditFilterInput) => {
    const e = (formState.errors as Record<string, { message?: string } | undefined>)[name];
    return e?.message ? (
      <p id={`audit-${name}-error`} className="text-xs text-alarm">
        {e.message}
      </p>
    ) : null;
  };
  const described = (name: keyof AuditFilterInput) =>
    (formState.errors as Record<string, unknown>)[name] ? { 'aria-invalid': true, 'aria-describedby': `audit-${name}-error` } : {};

  return (
    <form id="audit-filters" onSubmit={onSubmit} noValidate className="flex flex-wrap items-end gap-3 text-sm" data-testid="audit-filters">
      <label className="flex flex-col gap-1">
        <span className="text-ink-muted">Actor</span>
        <select className={`${input} border-line-strong`} {...register('actorId')} data-testid="audit-actor">
          <option value="">Anyone</option>
          {choices.actors.map((a) => (
            <option key={a.id} value={a.id}>
              {a.name}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1">
        <span className="text-ink-muted">Action</span>
        <select className={`${input} border-line-strong`} {...register('action')} data-testid="audit-action">
          <option value="">Any</option>
          {families.map((f) => (
            <option key={`family-${f}`} value={f}>
              {f}.* (all)
            </option>
          ))}
          {choices.actions.map((a) => (
            <option key={a} value={a}>
              {a}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1">
        <span className="text-ink-muted">Study</span>
        <select className={`${input} border-line-strong`} {...register('studyId')}>
          <option value="">Any</option>
          {choices.studies.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </select>
      </label>
      <div className="flex flex-col gap-1">
        <label htmlFor="audit-from" className="text-ink-muted">
          From (UTC)
        </label>
        <input
          id="audit-from"
          type="date"
          className={`${input} ${formState.errors.from ? 'border-alarm' : 'border-line-strong'}`}
          {...register('from')}
          {...described('from')}
        />
        {err('from')}
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="audit-to" className="text-ink-muted">
          To (UTC)
        </label>
        <input
          id="audit-to"
          type="date"
          className={`${input} ${formState.errors.to ? 'border-alarm' : 'border-line-strong'}`}
          {...register('to')}
          {...described('to')}
        />
        {err('to')}
      </div>
      <Button type="submit" data-testid="audit-apply">
        Apply
      </Button>
      <Button
        type="button"
        variant="quiet"
        onClick={() => {
          reset({ actorId: '', action: '', studyId: '', from: '', to: '' });
          router.push('/admin/audit');
        }}
      >
        Clear
      </Button>
    </form>
  );
}
