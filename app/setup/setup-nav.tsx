import Link from "next/link";
import styles from "./setup.module.css";

const TABS = [
  { id: "sites", label: "Sites", href: "/setup" },
  { id: "people", label: "People", href: "/setup/people" },
  { id: "keys", label: "API keys", href: "/setup/keys" },
  { id: "facilities", label: "Facilities and carriers", href: "/setup/facilities" },
] as const;

export function SetupNav({ active }: { active: (typeof TABS)[number]["id"] }) {
  return (
    <nav aria-label="Setup sections" className={styles.tabs}>
      {TABS.map((t) => (
        <Link key={t.id} href={t.href} aria-current={t.id === active ? "page" : undefined}>
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
