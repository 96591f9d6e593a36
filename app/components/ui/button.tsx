import type { ButtonHTMLAttributes } from "react";
import { cn } from "~/lib/cn";

type Variant = "primary" | "quiet" | "outline" | "danger";

const variants: Record<Variant, string> = {
  primary: "bg-dawn-500 text-night-950 hover:bg-dawn-400",
  quiet: "bg-night-800 text-night-100 hover:bg-night-700",
  outline: "border border-night-600 text-night-100 hover:border-dawn-500",
  danger: "bg-ember-500 text-night-950 hover:bg-ember-300",
};

/** A large touch target (min 48 px high). */
export function Button({ variant = "quiet", className, type = "button", ...props }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      type={type}
      className={cn(
        "inline-flex min-h-12 items-center justify-center gap-2 rounded-xl px-4 font-bold disabled:cursor-not-allowed disabled:opacity-50",
        variants[variant],
        className,
      )}
      {...props}
    />
  );
}
