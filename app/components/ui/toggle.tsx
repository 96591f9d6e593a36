import { cn } from "~/lib/cn";

/** A real switch (role="switch", aria-checked) drawn as a large pill. */
export function Toggle({
  checked,
  onChange,
  label,
  describedBy,
  disabled,
  className,
}: {
  checked: boolean;
  onChange: (next: boolean) => void;
  label: string;
  describedBy?: string;
  disabled?: boolean;
  className?: string;
}) {
  return (
    <button
      type="button"
      role="switch"
      aria-checked={checked}
      aria-label={label}
      aria-describedby={describedBy}
      disabled={disabled}
      onClick={() => onChange(!checked)}
      className={cn(
        "relative inline-flex h-12 w-20 shrink-0 items-center rounded-full border-2 transition-colors disabled:opacity-50",
        checked ? "border-dawn-400 bg-dawn-600" : "border-night-600 bg-night-800",
        className,
      )}
    >
      <span
        aria-hidden="true"
        className={cn(
          "absolute top-1 size-9 rounded-full transition-transform",
          checked ? "translate-x-8 bg-dawn-100" : "translate-x-1 bg-night-300",
        )}
      />
    </button>
  );
}
