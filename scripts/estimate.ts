/**
 * Prints the composition estimate of one battery as a table in kg and lb.
 *   npm run estimate -- --kind flooded --voltage 12 --ah 60 --kg 18
 */
import { parseArgs } from "node:util";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { estimateComposition, faradayFloor, kindInfo, KIND_IDS, NON_SPILLABLE_CAUTION, ZCompositionInput, type TMassRange } from "@/lib/chemistry";
import { fieldIssues } from "@/lib/errors";
import { kgToLb, lbToKg } from "@/lib/units";

const USAGE = `Usage: npm run estimate -- --kind <kind> --voltage <V> [--ah <Ah>] [--cca <A>] [--group <size>]
                             [--kg <kg> | --lb <lb>] [--sg <specific gravity>] [--temp <°C>] [--json]
  kinds: ${KIND_IDS.join(", ")}
  example: npm run estimate -- --kind flooded --voltage 12 --ah 60 --kg 18`;

const FLAG_OF: Record<string, string> = {
  kind: "--kind",
  nominalVoltage: "--voltage",
  capacityAh: "--ah",
  cca: "--cca",
  groupSize: "--group",
  weightKg: "--kg / --lb",
  specificGravity: "--sg",
  electrolyteTempC: "--temp",
};

function fail(lines: string[], code = 1): never {
  process.stderr.write(`${lines.join("\n")}\n`);
  process.exit(code);
}

/** A flag's number, or NaN for text that is not one (the schema then says what is wrong). */
const numberOf = (text: string | undefined): number | undefined =>
  text === undefined ? undefined : text.trim() === "" ? Number.NaN : Number(text);

function main(): void {
  let values: Record<string, string | boolean | undefined>;
  try {
    ({ values } = parseArgs({
      options: {
        kind: { type: "string" },
        voltage: { type: "string" },
        ah: { type: "string" },
        cca: { type: "string" },
        group: { type: "string" },
        kg: { type: "string" },
        lb: { type: "string" },
        sg: { type: "string" },
        temp: { type: "string" },
        json: { type: "boolean" },
        help: { type: "boolean", short: "h" },
      },
      strict: true,
      allowPositionals: false,
    }));
  } catch (error) {
    fail([`Cannot estimate: ${(error as Error).message}`, "", USAGE], 2);
  }
  if (values.help) {
    process.stdout.write(`${USAGE}\n`);
    return;
  }
  if (values.kind === undefined || values.voltage === undefined) fail(["Cannot estimate: --kind and --voltage are required.", "", USAGE], 2);
  if (values.kg !== undefined && values.lb !== undefined) fail(["Cannot estimate: give the weight with --kg or --lb, not both."], 2);

  const weightLb = numberOf(values.lb as string | undefined);
  const parsed = ZCompositionInput.safeParse({
    kind: values.kind,
    nominalVoltage: numberOf(values.voltage as string),
    capacityAh: numberOf(values.ah as string | undefined),
    cca: numberOf(values.cca as string | undefined),
    groupSize: values.group,
    weightKg: weightLb === undefined ? numberOf(values.kg as string | undefined) : lbToKg(weightLb),
    specificGravity: numberOf(values.sg as string | undefined),
    electrolyteTempC: numberOf(values.temp as string | undefined),
  });
  if (!parsed.success) {
    const lines = fieldIssues(parsed.error.issues).map((i) => `  ${FLAG_OF[i.field] ?? i.field}: ${i.message}`);
    fail(["Cannot estimate:", ...lines]);
  }
  const input = parsed.data;
  const c = estimateComposition(input);
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ input, ...c }, null, 2)}\n`);
    return;
  }

  const info = kindInfo(input.kind);
  const given = [
    `${info.label}, ${input.nominalVoltage} V (${c.cells} cell${c.cells === 1 ? "" : "s"})`,
    input.capacityAh != null ? `${input.capacityAh} Ah` : null,
    input.cca != null ? `${input.cca} CCA` : null,
    input.groupSize ? `group ${input.groupSize}` : null,
    input.weightKg != null ? `weighed ${input.weightKg.toFixed(2)} kg` : null,
    input.specificGravity != null
      ? `SG ${input.specificGravity.toFixed(3)}${input.electrolyteTempC != null ? ` at ${input.electrolyteTempC} °C` : ""}`
      : null,
  ].filter(Boolean);

  const f2 = (x: number) => x.toFixed(2);
  const cell = (r: TMassRange, to: (kg: number) => number) =>
    [f2(to(r.value)).padStart(9), `${f2(to(r.low))} – ${f2(to(r.high))}`.padStart(17)].join("  ");
  const same = (x: number) => x;
  const rows: Array<[string, TMassRange]> = [
    ["battery", c.batteryKg],
    ["lead (as Pb)", c.leadKg],
    ["electrolyte", c.electrolyteKg],
    ["  of which H2SO4", c.sulfuricAcidKg],
    ["polymer", c.polymerKg],
    ["other", c.otherKg],
  ];
  const out: string[] = [];
  out.push(`Composition estimate: ${given.join(", ")}`);
  out.push(`Method: ${c.method}`);
  out.push("");
  out.push(`${"part".padEnd(17)}${"kg".padStart(9)}  ${"range kg".padStart(17)}  ${"lb".padStart(9)}  ${"range lb".padStart(17)}`);
  for (const [name, r] of rows) out.push(`${name.padEnd(17)}${cell(r, same)}  ${cell(r, kgToLb)}`);
  if (input.capacityAh != null) {
    const floor = faradayFloor({ capacityAh: input.capacityAh, cells: c.cells });
    out.push("");
    out.push(
      `Faraday floor for ${input.capacityAh} Ah × ${c.cells} cells: Pb ${f2(floor.leadKg)} kg, PbO2 ${f2(floor.leadDioxideKg)} kg, H2SO4 ${f2(floor.sulfuricAcidKg)} kg`,
    );
  }
  out.push("");
  out.push("Notes:");
  for (const n of c.notes) out.push(`  - ${n}`);
  if (c.warnings.length > 0) {
    out.push("Warnings:");
    for (const w of c.warnings) out.push(`  ! ${w}`);
  }
  out.push("");
  out.push(`Transport: ${info.unNumber} is usual for this kind. ${NON_SPILLABLE_CAUTION}`);
  if (info.note) out.push(info.note);
  out.push(GENERAL_CAUTION);
  process.stdout.write(`${out.join("\n")}\n`);
}

main();
