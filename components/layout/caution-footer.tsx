/** The caution every screen carries: research software, not for clinical decisions. */
export function CautionFooter() {
  return (
    <footer data-testid="caution-footer" className="no-print border-t border-line bg-ground-sunken px-4 py-2 text-xs text-ink-faint">
      Quorum is research software: not for diagnosis, presurgical mapping or any clinical decision. Results depend on preprocessing and
      rater training. Local ethics approval and data-protection rules govern what you upload — use de-identified data.
    </footer>
  );
}
