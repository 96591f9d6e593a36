import { NavLink } from "react-router";
import type { ReactNode } from "react";
import { cn } from "~/lib/cn";
import { NightToggle } from "./night-toggle";

export type NavItem = { to: string; label: string; icon: ReactNode; end?: boolean };

const icons = {
  now: (
    <svg viewBox="0 0 24 24" aria-hidden="true" className="size-6">
      <path d="M2 17h20M5 17a7 7 0 0 1 14 0" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
    </svg>
  ),
  rigs: (
    <svg viewBox="0 0 24 24" aria-hidden="true" className="size-6">
      <path d="M3 7h12v9H3zM15 10h4l2 3v3h-6M7 19a2 2 0 1 0 0-.01M17 19a2 2 0 1 0 0-.01" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
    </svg>
  ),
  log: (
    <svg viewBox="0 0 24 24" aria-hidden="true" className="size-6">
      <path d="M6 3h10l3 3v15H6zM9 9h7M9 13h7M9 17h4" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" strokeLinecap="round" />
    </svg>
  ),
  people: (
    <svg viewBox="0 0 24 24" aria-hidden="true" className="size-6">
      <path d="M9 11a3.5 3.5 0 1 0 0-7 3.5 3.5 0 0 0 0 7zM2 20a7 7 0 0 1 14 0M16 4.5a3.5 3.5 0 0 1 0 6.5M18 14a6 6 0 0 1 4 6" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
    </svg>
  ),
  account: (
    <svg viewBox="0 0 24 24" aria-hidden="true" className="size-6">
      <path d="M12 12a4 4 0 1 0 0-8 4 4 0 0 0 0 8zM4 21a8 8 0 0 1 16 0" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
    </svg>
  ),
};

export const primaryNav: NavItem[] = [
  { to: "/", label: "Now", icon: icons.now, end: true },
  { to: "/rigs", label: "Rigs", icon: icons.rigs },
];

/**
 * The navigation for a signed-in person (with "People" for the rig in view), or the sign-in
 * entry for everyone else.
 */
export function navFor(signedIn: boolean, rigId?: string): NavItem[] {
  if (!signedIn) return [primaryNav[0]!, { to: "/sign-in", label: "Sign in", icon: icons.account }];
  if (!rigId) return [...primaryNav, { to: "/account", label: "Account", icon: icons.account }];
  // With a rig in view, "Now" is that rig's Now screen and "Rigs" lights up only on the list.
  return [
    { to: `/rigs/${rigId}`, label: "Now", icon: icons.now, end: true },
    { to: `/rigs/${rigId}/log`, label: "Logbook", icon: icons.log },
    { to: `/rigs/${rigId}/members`, label: "People", icon: icons.people },
    { to: "/rigs", label: "Rigs", icon: icons.rigs, end: true },
    { to: "/account", label: "Account", icon: icons.account },
  ];
}

/**
 * Phone: content with a bottom navigation bar. Wide screens: a side rail on the left.
 */
export function AppShell({ children, night, nav = primaryNav }: { children: ReactNode; night: boolean; nav?: NavItem[] }) {
  return (
    <div className="min-h-dvh md:flex">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:z-50 focus:bg-night-800 focus:p-3">
        Skip to content
      </a>
      <nav
        aria-label="Main"
        className={cn(
          "fixed inset-x-0 bottom-0 z-40 border-t border-night-700 bg-night-900/95 backdrop-blur",
          "md:sticky md:top-0 md:h-dvh md:w-56 md:border-r md:border-t-0 md:p-4",
        )}
      >
        <p className="hidden pb-6 text-xl font-bold tracking-wide text-dawn-400 md:block">Tilldawn</p>
        <ul className="flex justify-around md:flex-col md:gap-1">
          {nav.map((item) => (
            <li key={item.to} className="flex-1 md:flex-none">
              <NavLink
                to={item.to}
                end={item.end}
                className={({ isActive }) =>
                  cn(
                    "flex min-h-14 flex-col items-center justify-center gap-0.5 text-xs font-bold md:flex-row md:justify-start md:gap-3 md:rounded-xl md:px-3 md:text-base",
                    isActive ? "text-dawn-400 md:bg-night-800" : "text-night-300 hover:text-night-100",
                  )
                }
              >
                {item.icon}
                {item.label}
              </NavLink>
            </li>
          ))}
        </ul>
        <div className="hidden pt-6 md:block">
          <NightToggle initial={night} />
        </div>
      </nav>
      <main id="main" className="mx-auto w-full max-w-3xl flex-1 px-4 pb-28 pt-4 md:pb-8">
        <div className="mb-4 flex justify-end md:hidden">
          <NightToggle initial={night} />
        </div>
        {children}
      </main>
    </div>
  );
}
