/** The composition engine: pure functions, no framework or database imports. */
export { estimateComposition, MEASURED_SG_BAND, type TComposition, type TCompositionMethod, type TMassRange } from "./estimate-composition";
export { ZCompositionInput, INPUT_LIMITS, INPUT_MESSAGES, compositionInputIssues, type TCompositionInput } from "./composition-input";
export { faradayFloor, FLOOR_KG_PER_AH_CELL, type TFaradayFloor } from "./faraday-floor";
export { acidMassFraction, specificGravityAt20C, ACID_TABLE_RANGE, DENSITY_TABLE_20C, SG_PER_DEGREE_C, type TDensityPoint } from "./acid-mass-fraction";
export { cellsFor, VOLTS_PER_CELL } from "./cells-for";
export { KINDS, KIND_IDS, NON_SPILLABLE_CAUTION, isBatteryKind, kindInfo, type TBatteryKind, type TKindInfo } from "./kinds";
export { KIND_TABLE, type TCitedRange, type TKindParameters } from "./kind-table";
export { GROUP_WEIGHTS, groupWeight, normaliseGroupSize, type TGroupWeight } from "./group-sizes";
export { FARADAY_C_PER_MOL, ATOMIC_WEIGHT_G_PER_MOL, MOLAR_MASS_G_PER_MOL, G_PER_AH_PER_CELL, PB_SHARE } from "./molar-masses";
