export function LicensedDirectionFooter() {
  return (
    <footer className="border-t border-ink-200 bg-white px-6 py-3 text-xs text-ink-600">
      Bellwether supports and does not replace the laboratory&apos;s licensed direction. Its statistics describe
      healthy reference populations; they are not diagnoses. Interpret every result with the clinical picture and
      local policy.
    </footer>
  );
}
