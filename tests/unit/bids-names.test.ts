import { describe, expect, it } from 'vitest';
import { bidsName, distinctRunNames } from '@/lib/bids';

// Entity order sub, ses, task, acq, run: BIDS specification 1.9, appendix "Entity table".
describe('distinctRunNames', () => {
  it('leaves distinct names alone and numbers only names two runs share', () => {
    const stem = bidsName({ sub: '01', ses: '1', task: 'rest' });
    expect(stem).toBe('sub-01_ses-1_task-rest');
    const named = distinctRunNames([
      { runId: 4, name: stem },
      { runId: 9, name: stem },
      { runId: 5, name: 'sub-02_ses-1_task-rest' },
    ]);
    expect(named.map((r) => r.name)).toEqual([
      'sub-01_ses-1_task-rest (run #4)',
      'sub-01_ses-1_task-rest (run #9)',
      'sub-02_ses-1_task-rest',
    ]);
    expect(new Set(named.map((r) => r.name)).size).toBe(3);
  });
});
