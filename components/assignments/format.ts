/** "2026-12-08" of an ISO instant (UTC), for date inputs and the table. */
export function dayOf(iso: string | null): string {
  return iso ? iso.slice(0, 10) : '';
}

/** What removing (or replacing) a rater with votes does, said before the lead confirms. */
export function removalText(name: string, votes: number): string {
  return `${name} has ${votes} vote${votes === 1 ? '' : 's'} on this run. The votes stay in the database and in the audit log, but they no longer count for agreement or in the run's expected number of votes. The run's decisions are recomputed.`;
}
