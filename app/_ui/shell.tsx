import Link from "next/link";
import { can, type TAction, type TActor } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { SignOutButton } from "./sign-out-button";

type TScreen = { id: string; label: string; href: (siteId: string) => string; action: TAction };

/** The screens of DESIGN.md §3; a screen shows in the bar only where the person's role at the site opens it. */
export const SCREENS: TScreen[] = [
  { id: "site", label: "Site", href: (s) => `/sites/${s}`, action: "units.read" },
  { id: "counter", label: "Counter", href: (s) => `/sites/${s}/counter`, action: "units.create" },
];

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
