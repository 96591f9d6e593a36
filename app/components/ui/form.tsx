/** Form primitives: labelled fields with their errors announced, big touch targets. */
import { useId, type InputHTMLAttributes, type ReactNode } from "react";
import { cn } from "~/lib/cn";

export function Field({
  label,
  hint,
  error,
  className,
  ...input
}: { label: string; hint?: ReactNode; error?: string } & InputHTMLAttributes<HTMLInputElement>) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={cn("space-y-1", className)}>
      <label htmlFor={id} className="block font-bold">
        {label}
      </label>
      {hint ? (
        <p id={hintId} className="text-sm text-night-300">
          {hint}
        </p>
      ) : null}
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={cn(
          "block min-h-12 w-full rounded-xl border bg-night-950 px-3 text-lg text-night-100 placeholder:text-night-500",
          error ? "border-ember-500" : "border-night-600",
        )}
        {...input}
      />
      {error ? (
        <p id={errorId} className="text-sm font-bold text-ember-300">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function Button({
  children,
  variant = "primary",
  className,
  ...rest
}: { variant?: "primary" | "quiet" | "danger" } & React.ButtonHTMLAttributes<HTMLButtonElement>) {
  return (
    <button
      className={cn(
        "inline-flex min-h-12 items-center justify-center gap-2 rounded-xl px-5 font-bold disabled:opacity-60",
        variant === "primary" && "bg-dawn-500 text-night-950 hover:bg-dawn-400",
        variant === "quiet" && "border border-night-600 text-night-100 hover:bg-night-800",
        variant === "danger" && "border border-ember-500 text-ember-300 hover:bg-night-800",
        className,
      )}
      {...rest}
    >
      {children}
    </button>
  );
}

/** A message region read out by screen readers when it appears or changes. */
export function Notice({ tone = "info", children }: { tone?: "info" | "error" | "done"; children: ReactNode }) {
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      className={cn(
        "rounded-2xl border p-4",
        tone === "error" && "border-ember-500 bg-night-900 text-ember-300",
        tone === "info" && "border-night-600 bg-night-900 text-night-200",
        tone === "done" && "border-leaf-400 bg-night-900 text-night-100",
      )}
    >
      {children}
    </div>
  );
}

export function Card({ children, className }: { children: ReactNode; className?: string }) {
  return <section className={cn("space-y-3 rounded-2xl border border-night-700 bg-night-900 p-4", className)}>{children}</section>;
}
