import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";

/** Command-line tools the tests use on real outputs (PDF text and images, barcode decoding), by Debian package. */
export const TEST_TOOLS = [
  { command: "pdftotext", package: "poppler-utils", path: "/usr/bin/pdftotext" },
  { command: "pdftoppm", package: "poppler-utils", path: "/usr/bin/pdftoppm" },
  { command: "zbarimg", package: "zbar-tools", path: "/usr/bin/zbarimg" },
  // poppler draws pdfkit's built-in Helvetica with these metric-compatible fonts
  { command: "(fonts)", package: "fonts-urw-base35", path: "/usr/share/fonts/opentype/urw-base35" },
] as const;

/**
 * Installs the missing ones from Debian's packages when running as root on Debian (and says so); otherwise
 * stops with what to install. Nothing is downloaded from anywhere else.
 */
export function ensureTestTools(): void {
  const missing = [...new Set(TEST_TOOLS.filter((t) => !existsSync(t.path)).map((t) => t.package))];
  if (missing.length === 0) return;
  if (existsSync("/etc/debian_version") && process.getuid?.() === 0) {
    console.log(`Installing Debian packages the tests need: ${missing.join(", ")}`);
    for (const args of [["update", "-q"], ["install", "-y", "-q", ...missing]]) {
      const result = spawnSync("apt-get", args, { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
      if (result.status !== 0) throw new Error(`apt-get ${args.join(" ")} failed`);
    }
    return;
  }
  throw new Error(`The tests need these Debian/Ubuntu packages: ${missing.join(", ")} (sudo apt-get install ${missing.join(" ")}).`);
}
