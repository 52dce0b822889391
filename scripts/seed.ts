/** `npm run db:seed`: loads the demo scenario into an empty database (with --if-empty, says so and exits 0 otherwise). */
import { isDatabaseEmpty, seedDemo } from "../lib/db/seed";

const ifEmpty = process.argv.includes("--if-empty");
if (!(await isDatabaseEmpty())) {
  console.log("The database already has data; the demo scenario was not loaded.");
  process.exit(ifEmpty ? 0 : 1);
}
const started = Date.now();
const { siteIds } = await seedDemo();
console.log(`Loaded the demo scenario (Quarry Bend: 2 stores, 1 yard, ${Object.keys(siteIds).length} sites) in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
process.exit(0);
