import { useState } from "react";
import { setNightMode } from "~/lib/night-mode";
import { cn } from "~/lib/cn";

export function NightToggle({ initial, className }: { initial: boolean; className?: string }) {
  const [on, setOn] = useState(initial);
  return (
    <button
      type="button"
      aria-pressed={on}
      onClick={() => {
        setNightMode(!on);
        setOn(!on);
      }}
      className={cn(
        "inline-flex min-h-12 items-center gap-2 rounded-xl px-3 text-sm font-bold",
        "border border-night-600 text-night-200 hover:bg-night-800",
        className,
      )}
    >
      <span aria-hidden="true">{on ? "●" : "○"}</span>
      Red night mode
    </button>
  );
}
