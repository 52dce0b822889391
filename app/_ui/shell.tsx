import Link from "next/link";
import { can, canAnywhere, type TAction, type TActor } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { SignOutButton } from "./sign-out-button";

type TScreen = { id: string; label: string; href: (siteId: string) => string; action: TAction };

/** The screens of DESIGN.md §3; a screen shows in the bar only where the person's role at the site opens it. */
export const SCREENS: TScreen[] = [
  { id: "site", label: "Site", href: (s) => `/sites/${s}`, action: "units.read" },
  { id: "counter", label: "Counter", href: (s) => `/sites/${s}/counter`, action: "units.create" },
  { id: "yard", label: "Yard", href: (s) => `/sites/${s}/yard`, action: "yard.read" },
  { id: "limits", label: "Limits", href: (s) => `/sites/${s}/limits`, action: "limits.read" },
  { id: "loads", label: "Loads", href: (s) => `/sites/${s}/loads`, action: "loads.read" },
  { id: "papers", label: "Papers", href: (s) => `/sites/${s}/papers`, action: "loads.read" },
  { id: "deposits", label: "Deposits", href: (s) => `/sites/${s}/deposits`, action: "deposits.read" },
];

/** Organisation-level screens: in the bar for anyone whose role at any site opens them. */
export const ORGANISATION_SCREENS = [
  { id: "trail", label: "Trail", href: "/trail", action: "trail.read" },
  { id: "setup", label: "Setup", href: "/setup", action: "setup.read" },
] as const satisfies readonly { id: string; label: string; href: string; action: TAction }[];

export function Shell({
  actor,
  site,
  active,
  children,
}: {
  actor: TActor;
  site?: { id: string; name: string };
  active?: string;
  children: React.ReactNode;
}) {
  return (
    <>
      <header className="topbar">
        <Link className="mark" href="/">
          Lead<span>ger</span>
        </Link>
        {site && (
          <nav aria-label="Screens">
            {SCREENS.filter((s) => can(actor, s.action, site.id)).map((s) => (
              <Link key={s.id} href={s.href(site.id)} aria-current={s.id === active ? "page" : undefined}>
                {s.label}
              </Link>
            ))}
          </nav>
        )}
        {ORGANISATION_SCREENS.some((s) => canAnywhere(actor, s.action)) && (
          <nav aria-label="Organisation">
            {ORGANISATION_SCREENS.filter((s) => canAnywhere(actor, s.action)).map((s) => (
              <Link key={s.id} href={s.href} aria-current={s.id === active ? "page" : undefined}>
                {s.label}
              </Link>
            ))}
          </nav>
        )}
        <div className="who">
          {site && <span>{site.name}</span>}
          <span aria-label="Signed in as">{actor.label}</span>
          <SignOutButton />
        </div>
      </header>
      <main>{children}</main>
      <footer className="page-foot">{GENERAL_CAUTION}</footer>
    </>
  );
}
