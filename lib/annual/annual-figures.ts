import { AppError } from "@/lib/errors";
import { reaches } from "@/lib/limits/reaches";
import { isoDateOfUtcDay, MS_PER_DAY, utcDay } from "@/lib/limits/utc-day";
import { CAUTION } from "@/lib/rules/caution";
import { getRulebook } from "@/lib/rules/rulebooks";
import { TIER_TWO_ACID_THRESHOLD_LB, TIER_TWO_LEAD_THRESHOLD_LB } from "@/lib/rules/us-federal";
import { kgToLb, lbToKg } from "@/lib/units";
import { tierTwoRangeCode, type TTierTwoRangeCode } from "./tier-two-range-code";

/** One change of what a site holds (a LevelChange row): positive in, negative out. Masses in kg. */
export type TLevelEvent = { at: Date; batteryKg: number; leadKg: number; acidKg: number; unitCount: number };

/** What a site holds at a moment. Masses in kg. */
export type TOnHand = { batteryKg: number; leadKg: number; acidKg: number; unitCount: number };

export type TSubstance = "sulfuric-acid" | "lead" | "battery";

export type TSubstanceFigures = {
  substance: TSubstance;
  name: string;
  casNumber: string | null;
  maxDailyKg: number;
  maxDailyLb: number;
  /** null when the substance was never on site in the year. */
  maxDailyCode: TTierTwoRangeCode | null;
  /** The first day the maximum was on hand (YYYY-MM-DD), null when never on site. */
  maxDate: string | null;
  averageDailyKg: number;
  averageDailyLb: number;
  averageDailyCode: TTierTwoRangeCode | null;
  daysOnSite: number;
  /** The Tier II threshold at any one time, in lb; null for the battery mass (a mixture, see notes). */
  thresholdLb: number | null;
  isAtOrAboveThreshold: boolean | null;
};

/** The most on hand at any moment of a UTC day. */
export type TDailyOnHand = { date: string; batteryKg: number; leadKg: number; acidKg: number; unitCount: number };

export type TAnnualFigures = {
  siteId: string;
  year: number;
  /** First and last date of the reporting year, YYYY-MM-DD (UTC). */
  firstDate: string;
  lastDate: string;
  daysInYear: number;
  rulebookId: string;
  rulebookVersion: string;
  /** On hand at 00:00 UTC on 1 January and at the end of 31 December. */
  openingBalance: TOnHand;
  closingBalance: TOnHand;
  /** Events dated inside the year. */
  eventCount: number;
  substances: TSubstanceFigures[];
  days: TDailyOnHand[];
  notes: string[];
  caution: string;
};

export type TAnnualFiguresInput = {
  events: readonly TLevelEvent[];
  year: number;
  siteId: string;
  /** On hand at 00:00 UTC on 1 January. When given, events before the year are ignored; when not, they are summed to give it. */
  openingBalance?: TOnHand;
};

const COLUMNS = ["batteryKg", "leadKg", "acidKg", "unitCount"] as const;
const COLUMN_NAMES = ["battery mass", "lead", "sulfuric acid", "unit count"];
const [BATTERY, LEAD, ACID, UNITS] = [0, 1, 2, 3];

/** Less than this (1 g, or a fraction of a unit) counts as nothing on site: float sums of +x and −x rarely come back to exactly 0. */
const PRESENT_EPS = 1e-3;

const SUBSTANCES: readonly { substance: TSubstance; column: number; name: string; casNumber: string | null; thresholdLb: number | null }[] = [
  { substance: "sulfuric-acid", column: ACID, name: "Sulfuric acid", casNumber: "7664-93-9", thresholdLb: TIER_TWO_ACID_THRESHOLD_LB },
  { substance: "lead", column: LEAD, name: "Lead", casNumber: "7439-92-1", thresholdLb: TIER_TWO_LEAD_THRESHOLD_LB },
  { substance: "battery", column: BATTERY, name: "Lead-acid batteries (as a mixture)", casNumber: null, thresholdLb: null },
];

const FIXED_NOTES = [
  "Each day's amount is the most on hand at any moment of that UTC day: what was there at 00:00 plus each change of the day, taking the highest level reached. Changes at the same instant are applied together.",
  // Our reading of 40 CFR 370.42 (maximum amount, average daily amount, number of days on site), as the EPA
  // Tier II instructions explain the average: "total all daily weights and divide by the number of days the
  // chemical was present on the site".
  "Average daily amount: the daily amounts added up over the days the substance was on site, divided by the number of those days, not by the days in the year (our reading of 40 CFR 370.42 as the EPA Tier II instructions explain it).",
  "A day counts as a day on site when more than 1 g of the substance was on hand at some moment of it.",
  "Range codes are those of 40 CFR 370.43(a), in pounds (1 lb = 0.45359237 kg exactly). An amount takes the range whose lower bound it has reached, without rounding: 99.99 lb is 01, 100 lb is 02.",
  "Tier II thresholds at any one time: sulfuric acid 500 lb (40 CFR 370.10(a)(1)), lead 10 000 lb (40 CFR 370.10(a)). Batteries may be reported as a mixture by total weight (the battery row) or by their lead (EPA EPCRA FAQ; 55 FR 30640).",
  "Lead counts metal and compounds, as Pb. The report is due by 1 March of the following year (40 CFR 370.45).",
];

/**
 * Maximum daily amount, average daily amount and days on site of sulfuric acid, lead and battery mass for
 * one calendar year (UTC), from the site's on-hand changes. One pass over the events after one sort (and
 * no sort when they come in time order, as the data layer gives them).
 */
export function annualFigures({ events, year, siteId, openingBalance }: TAnnualFiguresInput): TAnnualFigures {
  if (!Number.isInteger(year) || year < 1970 || year > 9998) {
    throw new AppError("invalid_input", "year must be a whole year from 1970", [{ field: "year", message: "year must be a whole year from 1970" }]);
  }
  const firstDay = utcDay(new Date(Date.UTC(year, 0, 1)));
  const daysInYear = utcDay(new Date(Date.UTC(year + 1, 0, 1))) - firstDay;
  const startMs = firstDay * MS_PER_DAY;

  const n = events.length;
  const times = new Float64Array(n);
  let isSorted = true;
  for (let i = 0; i < n; i++) {
    const e = events[i];
    const t = e.at instanceof Date ? e.at.getTime() : Number.NaN;
    if (!Number.isFinite(t) || !Number.isFinite(e.batteryKg) || !Number.isFinite(e.leadKg) || !Number.isFinite(e.acidKg) || !Number.isFinite(e.unitCount)) {
      throw new AppError("invalid_input", `change ${i + 1} needs a valid date and numbers for every amount`);
    }
    times[i] = t;
    if (i > 0 && t < times[i - 1]) isSorted = false;
  }
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  if (!isSorted) order.sort((a, b) => times[a] - times[b]);

  const balance = [0, 0, 0, 0];
  const add = (e: TLevelEvent) => {
    balance[BATTERY] += e.batteryKg;
    balance[LEAD] += e.leadKg;
    balance[ACID] += e.acidKg;
    balance[UNITS] += e.unitCount;
  };
  if (openingBalance) COLUMNS.forEach((c, i) => (balance[i] = openingBalance[c]));

  let k = 0;
  while (k < n && times[order[k]] < startMs) {
    if (!openingBalance) add(events[order[k]]);
    k++;
  }
  const earlierCount = k;
  const opening = onHandOf(balance);

  const daily = COLUMNS.map(() => new Float64Array(daysInYear));
  const firstNegativeDay: (number | null)[] = balance.map((b) => (b < -PRESENT_EPS ? 0 : null));
  const max = [0, 0, 0, 0];
  for (let d = 0; d < daysInYear; d++) {
    const dayEndMs = startMs + (d + 1) * MS_PER_DAY;
    for (let c = 0; c < 4; c++) max[c] = balance[c];
    while (k < n && times[order[k]] < dayEndMs) {
      const t = times[order[k]];
      do add(events[order[k++]]);
      while (k < n && times[order[k]] === t);
      for (let c = 0; c < 4; c++) {
        if (balance[c] > max[c]) max[c] = balance[c];
        if (balance[c] < -PRESENT_EPS && firstNegativeDay[c] === null) firstNegativeDay[c] = d;
      }
    }
    for (let c = 0; c < 4; c++) daily[c][d] = max[c] > 0 ? max[c] : 0;
  }
  const eventCount = k - earlierCount;

  const substances = SUBSTANCES.map(({ substance, column, name, casNumber, thresholdLb }): TSubstanceFigures => {
    const values = daily[column];
    let maxKg = 0;
    let maxDay = -1;
    let sumKg = 0;
    let daysOnSite = 0;
    for (let d = 0; d < daysInYear; d++) {
      const v = values[d];
      if (v <= PRESENT_EPS) continue;
      daysOnSite++;
      sumKg += v;
      if (v > maxKg) {
        maxKg = v;
        maxDay = d;
      }
    }
    const averageKg = daysOnSite > 0 ? sumKg / daysOnSite : 0;
    const isPresent = daysOnSite > 0;
    return {
      substance,
      name,
      casNumber,
      maxDailyKg: maxKg,
      maxDailyLb: kgToLb(maxKg),
      maxDailyCode: isPresent ? tierTwoRangeCode(kgToLb(maxKg)) : null,
      maxDate: isPresent ? isoDateOfUtcDay(firstDay + maxDay) : null,
      averageDailyKg: averageKg,
      averageDailyLb: kgToLb(averageKg),
      averageDailyCode: isPresent ? tierTwoRangeCode(kgToLb(averageKg)) : null,
      daysOnSite,
      thresholdLb,
      isAtOrAboveThreshold: thresholdLb === null ? null : reaches(maxKg, lbToKg(thresholdLb)),
    };
  });

  const days: TDailyOnHand[] = new Array(daysInYear);
  for (let d = 0; d < daysInYear; d++) {
    days[d] = {
      date: isoDateOfUtcDay(firstDay + d),
      batteryKg: daily[BATTERY][d],
      leadKg: daily[LEAD][d],
      acidKg: daily[ACID][d],
      unitCount: daily[UNITS][d],
    };
  }

  const notes = [...FIXED_NOTES];
  if (openingBalance && earlierCount > 0) {
    notes.push(`${earlierCount} change(s) dated before ${year} were left out because an opening balance was given.`);
  } else if (!openingBalance) {
    notes.push(`Opening balance on 1 January: the sum of the ${earlierCount} change(s) dated before ${year}.`);
  }
  const negative = COLUMN_NAMES.flatMap((name, i) => {
    const day = firstNegativeDay[i];
    return day === null ? [] : [`${name} from ${isoDateOfUtcDay(firstDay + day)}`];
  });
  if (negative.length > 0) {
    notes.push(
      `The amount on hand fell below zero (${negative.join("; ")}): an opening balance or some intake records are missing. Such days were counted as nothing on site.`,
    );
  }

  const rulebook = getRulebook("us-federal");
  return {
    siteId,
    year,
    firstDate: isoDateOfUtcDay(firstDay),
    lastDate: isoDateOfUtcDay(firstDay + daysInYear - 1),
    daysInYear,
    rulebookId: rulebook.id,
    rulebookVersion: rulebook.version,
    openingBalance: opening,
    closingBalance: onHandOf(balance),
    eventCount,
    substances,
    days,
    notes,
    caution: CAUTION,
  };
}

const onHandOf = (b: readonly number[]): TOnHand => ({ batteryKg: b[BATTERY], leadKg: b[LEAD], acidKg: b[ACID], unitCount: b[UNITS] });
