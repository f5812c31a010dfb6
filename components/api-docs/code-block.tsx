"use client";

import { useState } from "react";

/**
 * A command or document to copy: the text as it is, with a Copy button. Where the clipboard is
 * not available (an insecure origin, a refused permission) the text is selected instead, so that
 * the person can copy it with the keyboard.
 */
export function CodeBlock({ code, label }: { code: string; label: string }) {
  const [status, setStatus] = useState<"idle" | "copied" | "selected">("idle");
  const id = `code-${label.toLowerCase().replace(/[^a-z0-9]+/g, "-")}`;

  async function copy() {
    try {
      await navigator.clipboard.writeText(code);
      setStatus("copied");
    } catch {
      const node = document.getElementById(id);
      if (node) window.getSelection()?.selectAllChildren(node);
      setStatus("selected");
    }
  }

  return (
    <div className="relative min-w-0 rounded-md border border-ink-200 bg-ink-900">
      <div className="flex items-center justify-between gap-3 border-b border-ink-700 px-3 py-1.5">
        <span className="text-xs text-ink-300">{label}</span>
        <span className="flex items-center gap-2">
          <span aria-live="polite" className="text-xs text-ink-200">
            {status === "copied" ? "Copied" : status === "selected" ? "Selected: press Ctrl+C (⌘C) to copy" : ""}
          </span>
          <button
            type="button"
            onClick={copy}
            aria-label={`Copy: ${label}`}
            className="rounded border border-ink-600 px-2 py-0.5 text-xs font-medium text-ink-100 hover:bg-ink-700"
          >
            Copy
          </button>
        </span>
      </div>
      <pre id={id} data-testid="code-block" className="overflow-x-auto px-3 py-2.5 text-xs leading-relaxed text-ink-50">
        <code>{code}</code>
      </pre>
    </div>
  );
}
