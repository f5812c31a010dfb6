import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from "react";

const control =
  "block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 shadow-xs focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high";

function FieldShell({ label, htmlFor, error, hint, children }: {
  label: string;
  htmlFor: string;
  error?: string;
  hint?: string;
  children: ReactNode;
}) {
  return (
    <div className="space-y-1">
      <label htmlFor={htmlFor} className="block text-xs font-medium uppercase tracking-wide text-ink-600">
        {label}
      </label>
      {children}
      {error ? (
        <p id={`${htmlFor}-error`} className="text-xs text-signal-high">
          {error}
        </p>
      ) : hint ? (
        <p className="text-xs text-ink-500">{hint}</p>
      ) : null}
    </div>
  );
}

export function TextField({ label, name, error, hint, ...props }: InputHTMLAttributes<HTMLInputElement> & {
  label: string;
  name: string;
  error?: string;
  hint?: string;
}) {
  const id = props.id ?? name;
  return (
    <FieldShell label={label} htmlFor={id} error={error} hint={hint}>
      <input
        id={id}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className={control}
        {...props}
      />
    </FieldShell>
  );
}

export function SelectField({ label, name, error, options, ...props }: SelectHTMLAttributes<HTMLSelectElement> & {
  label: string;
  name: string;
  error?: string;
  options: readonly { value: string; label: string }[];
}) {
  const id = props.id ?? name;
  return (
    <FieldShell label={label} htmlFor={id} error={error}>
      <select id={id} name={name} aria-invalid={error ? true : undefined} className={control} {...props}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldShell>
  );
}
