"use client";

import { Button } from "@/components/ui/button";

/** Opens the browser's print dialog (print to PDF for a clean report). */
export function PrintButton() {
  return (
    <Button type="button" onClick={() => window.print()}>
      Print or save as PDF
    </Button>
  );
}
