import { cn } from "~/lib/cn";

/**
 * State of charge as a horizon: a wide band whose left end is the night edge; stored energy
 * fills from there toward the right-hand end, which is a full bank (labelled "100 % full"), warm amber brightening as it rises. The usable floor is marked
 * where the night begins to win.
 */
export function HorizonBand({ socPct, stopSocPct, lowConfidence, className }: { socPct: number | null; stopSocPct: number; lowConfidence?: boolean; className?: string }) {
  const stop = Math.max(0, Math.min(100, stopSocPct));
  if (socPct === null) {
    // No SoC known: no fill (a filled band would read as a fact), only the floor and a question.
    return (
      <div
        role="img"
        aria-label={`State of charge unknown; usable floor ${Math.round(stop)} percent`}
        data-testid="band-unknown"
        className={cn("relative h-16 w-full overflow-hidden rounded-2xl border-2 border-dashed border-night-500 bg-night-950", className)}
      >
        <div className="absolute inset-y-0 left-0 bg-night-800" style={{ width: `${stop}%` }} aria-hidden="true" />
        <div aria-hidden="true" className="absolute inset-y-0 border-l-2 border-dashed border-ember-300" style={{ left: `${stop}%` }} />
        <span aria-hidden="true" className="absolute inset-0 flex items-center justify-center font-bold text-night-200">
          SoC unknown
        </span>
      </div>
    );
  }
  const soc = Math.max(0, Math.min(100, socPct));
  return (
    <div
      role="meter"
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={Math.round(soc)}
      aria-valuetext={`State of charge ${Math.round(soc)} percent; usable floor ${Math.round(stop)} percent`}
      aria-label="State of charge"
      className={cn("relative h-16 w-full overflow-hidden rounded-2xl border border-night-600 bg-night-950", className)}
    >
      {/* night sky below the floor */}
      <div className="absolute inset-y-0 left-0 bg-night-800" style={{ width: `${stop}%` }} aria-hidden="true" />
      {/* stored energy: from the night edge toward dawn */}
      <div
        aria-hidden="true"
        className={cn("absolute inset-y-0 left-0 transition-[width] duration-300", lowConfidence && "opacity-70")}
        style={{
          width: `${soc}%`,
          background: "linear-gradient(90deg, var(--color-dawn-700), var(--color-dawn-500) 60%, var(--color-dawn-300))",
        }}
      />
      {/* the horizon line at the top of the fill */}
      <div aria-hidden="true" className="absolute inset-y-0 w-1 bg-dawn-100" style={{ left: `calc(${soc}% - 2px)` }} />
      {/* the usable floor */}
      <div aria-hidden="true" className="absolute inset-y-0 border-l-2 border-dashed border-ember-300" style={{ left: `${stop}%` }} />
      <span aria-hidden="true" className="absolute bottom-1 text-[11px] font-bold text-ember-300" style={{ left: `calc(${stop}% + 4px)` }}>
        floor
      </span>
      <span aria-hidden="true" data-testid="band-full" className="absolute right-2 top-1 text-[11px] font-bold text-night-300">
        100 % full
      </span>
    </div>
  );
}
