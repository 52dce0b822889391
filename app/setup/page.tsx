import type { Metadata } from "next";
import { Shell } from "@/app/_ui/shell";
import { can } from "@/lib/auth/permissions";
import { listSiteSettings, SITE_KINDS, UNIT_SYSTEMS } from "@/lib/db/site-settings";
import { listRulebooks } from "@/lib/rules";
import { SetupNav } from "./setup-nav";
import { setupActor } from "./setup-actor";
import { SiteSettingsForm } from "./site-settings-form";
import { EXEMPTION_HINT } from "./exemption-hint";
import styles from "./setup.module.css";

export const metadata: Metadata = { title: "Setup · Sites" };
export const dynamic = "force-dynamic";

export default async function SetupSitesPage() {
  const actor = await setupActor();
  const sites = await listSiteSettings(actor);
  const rulebooks = listRulebooks().map((r) => ({ id: r.id, label: `${r.title} (${r.id})` }));
  const rulebookLabel = new Map(rulebooks.map((r) => [r.id, r.label]));
  return (
    <Shell actor={actor} active="setup">
      <h1>Setup</h1>
      <p className="lede">Sites, the people who work at them, and the keys other systems use.</p>
      <SetupNav active="sites" />
      {sites.map((site) => (
        <section key={site.id} className={`card ${styles.siteCard}`} aria-labelledby={`site-${site.id}`}>
          <h2 id={`site-${site.id}`}>{site.name}</h2>
          {can(actor, "setup.write", site.id) ? (
            <SiteSettingsForm site={site} kinds={[...SITE_KINDS]} unitSystems={[...UNIT_SYSTEMS]} rulebooks={rulebooks} exemptionHint={EXEMPTION_HINT} />
          ) : (
            <dl className={styles.facts} aria-label={`Settings of ${site.name}`}>
              <dt>Kind</dt>
              <dd>{site.kind === "store" ? "Store" : "Collection yard"}</dd>
              <dt>Address</dt>
              <dd>{site.address || "—"}</dd>
              <dt>Jurisdiction</dt>
              <dd>{site.jurisdiction}</dd>
              <dt>Rulebook</dt>
              <dd>{rulebookLabel.get(site.rulebookId) ?? site.rulebookId}</dd>
              <dt>Masses shown in</dt>
              <dd>{site.unitSystem}</dd>
              <dt>Consumer-product exemption</dt>
              <dd>{site.isConsumerExempt ? "On" : "Off"}</dd>
              <dt>Regulatory IDs</dt>
              <dd>{site.regulatoryIds || "—"}</dd>
            </dl>
          )}
        </section>
      ))}
    </Shell>
  );
}
