"use client";

import { useId, useMemo, useState, type KeyboardEvent } from "react";
import type { ScoreAnalyte } from "./types";

const MAX_OPTIONS = 12;

/** Analytes whose name, code or LOINC code contains what was typed; exact code and LOINC first. */
export function matchAnalytes(analytes: ScoreAnalyte[], query: string): ScoreAnalyte[] {
  const q = query.trim().toLowerCase();
  if (!q) return analytes;
  const rank = (a: ScoreAnalyte) => {
    if (a.code.toLowerCase() === q || a.loinc === q) return 0;
    if (a.code.toLowerCase().startsWith(q) || a.name.toLowerCase().startsWith(q)) return 1;
    return 2;
  };
  return analytes
    .filter((a) => a.code.toLowerCase().includes(q) || a.name.toLowerCase().includes(q) || (a.loinc ?? "").includes(q))
    .sort((a, b) => rank(a) - rank(b));
}

export const analyteLabel = (a: ScoreAnalyte) => `${a.name} (${a.code})`;

/**
 * The analyte search: a combobox over the catalogue by name, code or LOINC. Analytes without an
 * interval in force are listed but cannot be chosen, each with the reason in words.
 */
export function AnalytePicker({
  analytes,
  value,
  onChange,
  label = "Analyte",
  id,
  initialQuery = "",
  error,
}: {
  analytes: ScoreAnalyte[];
  value: string | null;
  onChange: (code: string | null) => void;
  label?: string;
  id?: string;
  initialQuery?: string;
  error?: string;
}) {
  const autoId = useId();
  const inputId = id ?? `analyte-${autoId}`;
  const listId = `${inputId}-options`;
  const chosen = analytes.find((a) => a.code === value) ?? null;
  const [query, setQuery] = useState(chosen ? analyteLabel(chosen) : initialQuery);
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(0);
  const options = useMemo(() => matchAnalytes(analytes, chosen && query === analyteLabel(chosen) ? "" : query).slice(0, MAX_OPTIONS), [analytes, chosen, query]);

  const choose = (a: ScoreAnalyte) => {
    if (a.unavailable) return;
    onChange(a.code);
    setQuery(analyteLabel(a));
    setOpen(false);
  };

  const onKeyDown = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key === "ArrowDown") {
      e.preventDefault();
      setOpen(true);
      setActive((i) => Math.min(options.length - 1, open ? i + 1 : 0));
    } else if (e.key === "ArrowUp") {
      e.preventDefault();
      setActive((i) => Math.max(0, i - 1));
    } else if (e.key === "Enter" && open) {
      e.preventDefault();
      const option = options[active];
      if (option) choose(option);
    } else if (e.key === "Escape") {
      setOpen(false);
    }
  };

  const hint = chosen?.inForce
    ? `Interval version ${chosen.inForce.number} in force, in ${chosen.unit}${
        chosen.inForce.bySex || chosen.inForce.byAge
          ? `; partitioned by ${[chosen.inForce.bySex ? "sex" : "", chosen.inForce.byAge ? "age" : ""].filter(Boolean).join(" and ")}: give ${
              chosen.inForce.bySex && chosen.inForce.byAge ? "both" : chosen.inForce.bySex ? "the sex" : "the age"
            }`
          : ""
      }.`
    : "Search by name, code or LOINC code.";

  return (
    <div className="relative space-y-1">
      <label htmlFor={inputId} className="block text-xs font-medium uppercase tracking-wide text-ink-600">
        {label}
      </label>
      <input
        id={inputId}
        type="text"
        role="combobox"
        autoComplete="off"
        aria-expanded={open}
        aria-controls={listId}
        aria-autocomplete="list"
        aria-activedescendant={open && options[active] ? `${listId}-${options[active].code}` : undefined}
        aria-invalid={error ? true : undefined}
        aria-describedby={`${inputId}-hint`}
        value={query}
        placeholder="e.g. potassium, K or 2823-3"
        className="block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 shadow-xs focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high"
        onChange={(e) => {
          setQuery(e.target.value);
          setOpen(true);
          setActive(0);
          if (value) onChange(null);
        }}
        onFocus={() => setOpen(true)}
        onBlur={() => setOpen(false)}
        onKeyDown={onKeyDown}
      />
      <p id={`${inputId}-hint`} className={`text-xs ${error ? "text-signal-high" : "text-ink-500"}`}>
        {error ?? hint}
      </p>
      {open ? (
        <ul
          id={listId}
          role="listbox"
          aria-label={`${label}: matching analytes`}
          className="absolute left-0 right-0 top-[3.6rem] z-20 max-h-80 overflow-y-auto rounded-md border border-ink-200 bg-white py-1 text-sm shadow-lg"
        >
          {options.length === 0 ? (
            <li className="px-3 py-2 text-ink-600" role="option" aria-selected={false} aria-disabled>
              No analyte matches “{query}”. Try the name, our code or the LOINC code.
            </li>
          ) : (
            options.map((a, i) => (
              <li
                key={a.code}
                id={`${listId}-${a.code}`}
                role="option"
                aria-selected={a.code === value}
                aria-disabled={a.unavailable ? true : undefined}
                className={`px-3 py-1.5 ${a.unavailable ? "cursor-not-allowed text-ink-500" : "cursor-pointer text-ink-900"} ${
                  i === active ? "bg-tide-50" : ""
                }`}
                onMouseDown={(e) => {
                  e.preventDefault();
                  choose(a);
                }}
                onMouseEnter={() => setActive(i)}
              >
                <span className="font-medium">{a.name}</span>{" "}
                <span className="text-ink-600">
                  {a.code}
                  {a.loinc ? ` · LOINC ${a.loinc}` : ""} · {a.unit}
                </span>
                {a.unavailable ? <span className="block text-xs text-ink-600">{a.unavailable}</span> : null}
              </li>
            ))
          )}
        </ul>
      ) : null}
    </div>
  );
}
