import type { ButtonHTMLAttributes } from "react";

const VARIANTS = {
  primary: "bg-tide-600 text-white hover:bg-tide-700 disabled:bg-ink-300",
  secondary: "border border-ink-300 bg-white text-ink-800 hover:bg-ink-100 disabled:text-ink-400",
  danger: "border border-signal-high/40 bg-white text-signal-high hover:bg-red-50 disabled:text-ink-400",
} as const;

export type ButtonVariant = keyof typeof VARIANTS;

export function Button({
  variant = "primary",
  className = "",
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: ButtonVariant }) {
  return (
    <button
      className={`inline-flex items-center justify-center gap-1.5 whitespace-nowrap rounded-md px-3 py-1.5 text-sm font-medium transition-colors disabled:cursor-not-allowed ${VARIANTS[variant]} ${className}`}
      {...props}
    />
  );
}
