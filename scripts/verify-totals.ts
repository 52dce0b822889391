/**
 * `npm run verify:totals`: recounts the running totals of every site, bay and container on DATABASE_URL from the
 * unit and lot records (and each site's level ledger) and reports any drift. Exit 1 when anything drifted.
 * `-- --site <id>` checks one site.
 */
import { verifyTotals } from "../lib/db/verify-totals";
import { redactUrl, DEFAULT_DATABASE_URL } from "../lib/db/migrate/database-url";

const siteArg = process.argv.indexOf("--site");
const siteIds = siteArg > 0 && process.argv[siteArg + 1] ? [process.argv[siteArg + 1]!] : undefined;
const started = Date.now();
const report = await verifyTotals(undefined, { siteIds });
const took = ((Date.now() - started) / 1000).toFixed(1);
console.log(`Checked ${report.checked.sites} site(s), ${report.checked.bays} bay(s), ${report.checked.containers} container(s) on ${redactUrl(process.env.DATABASE_URL || DEFAULT_DATABASE_URL)} in ${took} s.`);
if (!report.hasDrift) {
  console.log("No drift: every running total matches a recount of the records.");
  process.exit(0);
}
for (const d of report.drift) {
  console.log(`DRIFT ${d.scope} ${d.name} (${d.id}, site ${d.siteId})`);
  for (const f of d.fields) console.log(`  ${f.field}: recorded ${f.recorded}, recounted ${f.recounted}, difference ${f.difference}`);
}
console.log(`${report.drift.length} total(s) drifted.`);
process.exit(1);
