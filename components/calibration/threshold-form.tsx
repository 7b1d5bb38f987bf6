'use client';
import { useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { putJson } from '@/lib/api/client';
import type { CalibrationThreshold } from '@/lib/agreement/threshold-gate';
import { Button } from '@/components/ui/button';
import { calibrationKey } from './use-calibration';

/** The study's calibration threshold: what a rater must reach on the calibration set before live runs are assigned to them. */
export function ThresholdForm({
  studyId,
  threshold,
  recalibrationWeeks,
}: {
  studyId: number;
  threshold: CalibrationThreshold;
  recalibrationWeeks: number | null;
}) {
  const qc = useQueryClient();
  const [ac1, setAc1] = useState(threshold.minAc1 == null ? '' : String(threshold.minAc1));
  const [sens, setSens] = useState(threshold.minSensitivity == null ? '' : String(threshold.minSensitivity));
  const [name, setName] = useState(threshold.setName ?? '');
  const [weeks, setWeeks] = useState(recalibrationWeeks == null ? '' : String(recalibrationWeeks));
  const [msg, setMsg] = useState<string | null>(null);
  const num = (v: string) => (v.trim() === '' ? null : Number(v));
  async function save() {
    setMsg(null);
    const r = await putJson<CalibrationThreshold & { recalibrationWeeks: number | null }>(`/api/studies/${studyId}/calibration/threshold`, {
      minAc1: num(ac1),
      minSensitivity: num(sens),
      setName: name,
      recalibrationWeeks: num(weeks),
    });
    if (!r.ok) return setMsg(r.fields ? Object.values(r.fields).flat().join(' ') : r.message);
    const every =
      r.data.recalibrationWeeks == null
        ? ''
        : ` Certified raters get the set again every ${r.data.recalibrationWeeks} week${r.data.recalibrationWeeks === 1 ? '' : 's'}.`;
    setMsg(
      `${r.data.minAc1 == null && r.data.minSensitivity == null ? 'No threshold: every rater may get live runs.' : 'Threshold saved.'}${every}`,
    );
    await qc.invalidateQueries({ queryKey: calibrationKey(studyId) });
  }
  return (
    <form
      className="flex flex-wrap items-end gap-3 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        void save();
      }}
      data-testid="calibration-threshold"
    >
      <label className="flex flex-col gap-1 text-xs text-ink-muted">
        Name of the calibration set
        <input
          className="w-56 rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
          maxLength={80}
          placeholder="e.g. Autumn reference set"
          value={name}
          onChange={(e) => setName(e.target.value)}
          data-testid="calibration-set-name"
        />
      </label>
      <label className="flex flex-col gap-1 text-xs text-ink-muted">
        Minimum Gwet&apos;s AC1
        <input
          className="w-24 rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
          inputMode="decimal"
          placeholder="none"
          value={ac1}
          onChange={(e) => setAc1(e.target.value)}
          data-testid="threshold-ac1"
        />
      </label>
      <label className="flex flex-col gap-1 text-xs text-ink-muted">
        Minimum noise sensitivity
        <input
          className="w-24 rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
          inputMode="decimal"
          placeholder="none"
          value={sens}
          onChange={(e) => setSens(e.target.value)}
          data-testid="threshold-sensitivity"
        />
      </label>
      <label className="flex flex-col gap-1 text-xs text-ink-muted">
        Re-calibrate every (weeks)
        <input
          className="w-20 rounded border border-line-strong bg-ground-sunken px-2 py-1 text-ink"
          inputMode="numeric"
          placeholder="never"
          value={weeks}
          onChange={(e) => setWeeks(e.target.value)}
          data-testid="recalibration-weeks"
        />
      </label>
      <Button variant="quiet" type="submit" data-testid="threshold-save">
        Save
      </Button>
      <span className="text-xs text-ink-muted">
        Raters below the threshold get no live runs (empty: no threshold). Certified raters get the set again when their last pass is that
        many weeks old (empty: never).
      </span>
      {msg ? (
        <span className="text-xs" data-testid="threshold-message">
          {msg}
        </span>
      ) : null}
    </form>
  );
}
