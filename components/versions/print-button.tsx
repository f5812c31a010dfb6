"use client";

import { Button } from "@/components/ui/button";

/** Opens the browser's print dialog (A4 or Letter: the record's stylesheet fits either). */
export function PrintButton() {
  return (
    <Button type="button" onClick={() => window.print()}>
      Print or save as PDF
    </Button>
  );
}
