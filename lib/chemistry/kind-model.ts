import { acidMassFraction } from "./acid-mass-fraction";
import { KIND_TABLE, type TKindParameters } from "./kind-table";
import { KIND_IDS, kindInfo, type TBatteryKind } from "./kinds";
import { batteryFractions, type TFractionRange } from "./lead-as-pb";

/** What the estimate needs of a kind, worked out once from the cited table when the module loads. */
export type TKindModel = {
  readonly kind: TBatteryKind;
  readonly label: string;
  readonly lead: TFractionRange;
  readonly electrolyte: TFractionRange;
  readonly polymer: TFractionRange;
  readonly other: TFractionRange;
  readonly specificEnergyWhPerKg: TFractionRange;
  readonly chargedSpecificGravity: TFractionRange;
  /** H2SO4 mass fraction of the electrolyte at the charged SG (low, value, high). */
  readonly chargedAcidFraction: TFractionRange;
  readonly defaultKgPerCell: TFractionRange;
  /** Group-size weights are for car, truck, marine and golf-cart units. */
  readonly usesGroupSize: boolean;
  readonly text: {
    readonly fromCapacity: string;
    readonly kindDefault: string;
    readonly chargedAcid: string;
    readonly sgAboveCharged: string;
    readonly lightForCapacity: string;
  };
};

const GROUP_SIZE_KINDS: ReadonlySet<TBatteryKind> = new Set(["flooded", "efb", "agm", "gel", "deep-cycle"]);

const sg = (x: number) => x.toFixed(3);
const num = (x: number) => (Number.isInteger(x) ? String(x) : x.toFixed(2));

function modelOf(kind: TBatteryKind, p: TKindParameters): TKindModel {
  const { label } = kindInfo(kind);
  const fractions = batteryFractions(p);
  const se = p.specificEnergyWhPerKg;
  const s = p.chargedSpecificGravity;
  const perCell = p.defaultKgPerCell;
  return {
    kind,
    label,
    ...fractions,
    specificEnergyWhPerKg: { low: se.low, value: se.value, high: se.high },
    chargedSpecificGravity: { low: s.low, value: s.value, high: s.high },
    chargedAcidFraction: {
      low: acidMassFraction({ specificGravity: s.low }),
      value: acidMassFraction({ specificGravity: s.value }),
      high: acidMassFraction({ specificGravity: s.high }),
    },
    defaultKgPerCell: { low: perCell.low, value: perCell.value, high: perCell.high },
    usesGroupSize: GROUP_SIZE_KINDS.has(kind),
    text: {
      fromCapacity: `Battery mass from capacity × voltage at ${num(se.low)}–${num(se.high)} Wh/kg (typical ${num(se.value)}) for ${label.toLowerCase()} units.`,
      kindDefault: `No weight, capacity or usable group size was given: the figures are for a typical ${label.toLowerCase()} unit (${num(perCell.low)}–${num(perCell.high)} kg per 2 V cell) and may be far off. Weigh the unit for a better estimate.`,
      lightForCapacity: `The weight is light for the stated capacity: it comes to well over the ${num(se.high)} Wh/kg that ${label.toLowerCase()} units reach. Check the weight and the capacity; lead and acid are held at least at the Faraday floor of that capacity.`,
      sgAboveCharged: `The measured specific gravity is above the ${sg(s.high)} a charged ${label.toLowerCase()} unit usually holds: check the reading.`,
      chargedAcid: `Acid from the charged-state specific gravity, ${sg(s.value)} (${sg(s.low)}–${sg(s.high)}): the conservative choice for storage thresholds.`,
    },
  };
}

export const KIND_MODEL: Readonly<Record<TBatteryKind, TKindModel>> = Object.fromEntries(
  KIND_IDS.map((kind) => [kind, modelOf(kind, KIND_TABLE[kind])]),
) as Record<TBatteryKind, TKindModel>;
