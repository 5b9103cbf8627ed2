import type { ButtonHTMLAttributes } from "react";

const KINDS = {
  primary: "bg-tarn-700 text-white hover:bg-tarn-800 disabled:bg-ink-300",
  secondary: "border border-ink-300 bg-white text-ink-900 hover:bg-ink-50 disabled:text-ink-400",
  danger: "bg-severity-fail text-white hover:opacity-90 disabled:bg-ink-300",
} as const;

export function Button({ kind = "primary", className, ...rest }: { kind?: keyof typeof KINDS } & ButtonHTMLAttributes<HTMLButtonElement>) {
  return <button className={`rounded px-4 py-2 text-sm font-medium ${KINDS[kind]} ${className ?? ""}`} {...rest} />;
}
