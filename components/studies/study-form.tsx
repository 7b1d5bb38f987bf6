'use client';

import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { studySchema, type StudyInput, type StudyValues } from '@/lib/studies/schema';
import {
  CONSENSUS_NAMES,
  CONSENSUS_RULES,
  DIM_METHOD_NAMES,
  DIM_METHODS,
  LOW_REPRODUCIBILITY_NAMES,
  LOW_REPRODUCIBILITY_POLICIES,
  NOISE_KIND_KEYS,
  NOISE_KIND_NAMES,
} from '@/lib/vocabulary/protocol';
import { patchJson, postJson } from '@/lib/api/client';
import { Field } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

const toNumberOrNull = (v: unknown) => (v === '' || v === null || v === undefined ? null : Number(v));

/** Creates a study (POST /api/studies) or edits its protocol (PATCH /api/studies/:id). */
export function StudyForm({ initial, studyId }: { initial: StudyValues; studyId?: number }) {
  const router = useRouter();
  const [failure, setFailure] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const { register, handleSubmit, formState, setError, control } = useForm<StudyInput, unknown, StudyValues>({
    resolver: zodResolver(studySchema),
    defaultValues: initial,
  });
  const [dimMethod, allowUncertain] = useWatch({ control, name: ['dimMethod', 'allowUncertain'] });
  const errors = formState.errors;

  const onSubmit = handleSubmit(async (values) => {
    setFailure(null);
    setSaved(false);
    const result = studyId ? await patchJson(`/api/studies/${studyId}`, values) : await postJson<{ id: number }>('/api/studies', values);
    if (result.ok) {
      if (studyId) {
        setSaved(true);
        router.refresh();
      } else {
        router.push(`/studies/${(result.data as { id: number }).id}`);
      }
      return;
    }
    for (const [field, messages] of Object.entries(result.fields ?? {})) setError(field as keyof StudyInput, { message: messages[0] });
    setFailure(result.message);
  });

  return (
    <form onSubmit={onSubmit} noValidate className="grid max-w-3xl gap-5" data-testid="study-form">
      {failure ? <Notice kind="error">{failure}</Notice> : null}
      {saved ? <Notice kind="ok">The protocol was saved.</Notice> : null}
      <Field label="Name" {...register('name')} error={errors.name?.message} />
      <div className="flex flex-col gap-1">
        <label htmlFor="field-description" className="text-sm text-ink-muted">
          Description
        </label>
        <textarea
          id="field-description"
          rows={3}
          className="rounded border border-line-strong bg-ground-sunken px-3 py-2 text-sm"
          {...register('description')}
        />
      </div>

      <fieldset className="grid gap-3 rounded border border-line p-4">
        <legend className="px-1 text-sm font-semibold">Rating</legend>
        <Field
          label="Raters per run (1–5)"
          type="number"
          min={1}
          max={5}
          {...register('ratersPerRun', { valueAsNumber: true })}
          error={errors.ratersPerRun?.message}
        />
        <Select label="Consensus rule" error={errors.consensusRule?.message} {...register('consensusRule')}>
          {CONSENSUS_RULES.map((r) => (
            <option key={r} value={r}>
              {CONSENSUS_NAMES[r]}
            </option>
          ))}
        </Select>
        <div className="text-sm">
          <p className="text-ink-muted">Labels: Signal, Noise{allowUncertain ? ', Uncertain' : ''}</p>
          <Check label="Offer “Uncertain” as a label" {...register('allowUncertain')} />
        </div>
        <div
          className="text-sm"
          role="group"
          aria-labelledby="noise-kinds-label"
          aria-describedby={errors.noiseKinds ? 'noise-kinds-error' : undefined}
        >
          <p id="noise-kinds-label" className="text-ink-muted">
            Noise kinds
          </p>
          <div className="grid grid-cols-2 gap-1 sm:grid-cols-4">
            {NOISE_KIND_KEYS.map((k) => (
              <label key={k} className="flex items-center gap-2">
                <input type="checkbox" value={k} {...register('noiseKinds')} /> {NOISE_KIND_NAMES[k]}
              </label>
            ))}
          </div>
          {errors.noiseKinds ? (
            <p id="noise-kinds-error" className="text-xs text-alarm">
              {errors.noiseKinds.message}
            </p>
          ) : null}
        </div>
        <Check label="Blinding: raters do not see each other's votes before they submit" {...register('blinding')} />
        <Check label="Show the other votes to a rater after they submit" {...register('showVotesAfterSubmit')} />
      </fieldset>

      <fieldset className="grid gap-3 rounded border border-line p-4">
        <legend className="px-1 text-sm font-semibold">Decomposition</legend>
        <Field
          label="Initial volumes to drop"
          type="number"
          min={0}
          {...register('dropVolumes', { valueAsNumber: true })}
          error={errors.dropVolumes?.message}
          hint="Runs need more than this plus 10 volumes."
        />
        <Select label="Number of components" error={errors.dimMethod?.message} {...register('dimMethod')}>
          {DIM_METHODS.map((m) => (
            <option key={m} value={m}>
              {DIM_METHOD_NAMES[m]}
            </option>
          ))}
        </Select>
        {dimMethod === 'fixed' ? (
          <Field
            label="Components (fixed N)"
            type="number"
            min={2}
            {...register('fixedComponents', { setValueAs: toNumberOrNull })}
            error={errors.fixedComponents?.message}
          />
        ) : null}
        {dimMethod === 'variance' ? (
          <Field
            label="Fraction of variance to keep"
            type="number"
            step="0.01"
            min={0.01}
            max={0.99}
            {...register('varianceFraction', { setValueAs: toNumberOrNull })}
            error={errors.varianceFraction?.message}
          />
        ) : null}
        <Check label="Variance normalisation per voxel" {...register('varianceNorm')} />
        <Check label="Linear detrend" {...register('detrend')} />
        <Field
          label="Reproducibility threshold (0–1)"
          type="number"
          step="0.05"
          min={0}
          max={1}
          {...register('reproducibilityThreshold', { valueAsNumber: true })}
          error={errors.reproducibilityThreshold?.message}
          hint="How closely a component must come back when the decomposition is re-run from other starting points (1 = identical)."
        />
        <Select label="Components below the threshold" error={errors.lowReproducibility?.message} {...register('lowReproducibility')}>
          {LOW_REPRODUCIBILITY_POLICIES.map((p) => (
            <option key={p} value={p}>
              {LOW_REPRODUCIBILITY_NAMES[p]}
            </option>
          ))}
        </Select>
      </fieldset>

      <Button type="submit" disabled={formState.isSubmitting} className="w-fit" data-testid="study-save">
        {studyId ? 'Save protocol' : 'Create study'}
      </Button>
    </form>
  );
}

type SelectProps = React.SelectHTMLAttributes<HTMLSelectElement> & {
  label: string;
  name: string;
  error?: string;
  ref?: React.Ref<HTMLSelectElement>;
};
function Select({ label, name, error, children, ref, ...props }: SelectProps) {
  const id = `field-${name}`;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm text-ink-muted">
        {label}
      </label>
      <select
        id={id}
        name={name}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="rounded border border-line-strong bg-ground-sunken px-3 py-2 text-sm"
        {...props}
      >
        {children}
      </select>
      {error ? (
        <p id={`${id}-error`} className="text-xs text-alarm">
          {error}
        </p>
      ) : null}
    </div>
  );
}

type CheckProps = React.InputHTMLAttributes<HTMLInputElement> & { label: string; ref?: React.Ref<HTMLInputElement> };
function Check({ label, ref, ...props }: CheckProps) {
  return (
    <label className="flex items-center gap-2 text-sm">
      <input type="checkbox" ref={ref} {...props} /> {label}
    </label>
  );
}
