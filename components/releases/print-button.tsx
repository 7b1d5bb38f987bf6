'use client';
import { Button } from '@/components/ui/button';

export function PrintButton() {
  return (
    <Button variant="quiet" className="no-print" onClick={() => window.print()} data-testid="print-report">
      Print or save as PDF
    </Button>
  );
}
