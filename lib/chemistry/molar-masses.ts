/**
 * Constants of the cell reaction. Everything per ampere-hour is derived here from F and the atomic
 * weights, never typed in, so the tests can check it against the published per-Ah figures.
 */

/** C/mol; exact since the 2019 SI (e × N_A). SI Brochure 9th ed. / CODATA 2018. */
export const FARADAY_C_PER_MOL = 96485.33212;

/** A·h of charge carried by one mole of electrons (F / 3600 s/h). */
export const AH_PER_MOL_ELECTRONS = FARADAY_C_PER_MOL / 3600;

/** g/mol. Pb: IUPAC CIAAW standard atomic weight; S, O, H: IUPAC conventional values. */
export const ATOMIC_WEIGHT_G_PER_MOL = { Pb: 207.2, S: 32.06, O: 15.999, H: 1.008 } as const;

const { Pb, S, O, H } = ATOMIC_WEIGHT_G_PER_MOL;

/** g/mol, computed from the atomic weights above. */
export const MOLAR_MASS_G_PER_MOL = {
  Pb,
  PbO: Pb + O,
  PbO2: Pb + 2 * O,
  PbSO4: Pb + S + 4 * O,
  H2SO4: 2 * H + S + 4 * O,
  H2O: 2 * H + O,
} as const;

const M = MOLAR_MASS_G_PER_MOL;

/*
 * Discharge: Pb + PbO2 + 2 H2SO4 → 2 PbSO4 + 2 H2O, two electrons per formula unit.
 * Faraday's law: 1 A·h moves 1 / AH_PER_MOL_ELECTRONS mol of electrons through every cell in series, so
 * per A·h and per cell it takes half a mole-equivalent of Pb, of PbO2, and a full one of H2SO4.
 */
const MOL_REACTION_PER_AH = 1 / (2 * AH_PER_MOL_ELECTRONS);

/** Grams per A·h per cell. */
export const G_PER_AH_PER_CELL = {
  /** Pb oxidised at the negative plate. */
  PbNegative: M.Pb * MOL_REACTION_PER_AH,
  /** PbO2 reduced at the positive plate. */
  PbO2Positive: M.PbO2 * MOL_REACTION_PER_AH,
  /** H2SO4 taken from the electrolyte (two per formula unit). */
  H2SO4: 2 * M.H2SO4 * MOL_REACTION_PER_AH,
  /** PbSO4 formed on both plates. */
  PbSO4Formed: 2 * M.PbSO4 * MOL_REACTION_PER_AH,
  /** H2O formed in the electrolyte. */
  H2OFormed: 2 * M.H2O * MOL_REACTION_PER_AH,
} as const;

/** Mass share of Pb in each lead compound found in a battery's paste (molar-mass ratios). */
export const PB_SHARE = {
  PbSO4: M.Pb / M.PbSO4,
  PbO2: M.Pb / M.PbO2,
  PbO: M.Pb / M.PbO,
  /** Sponge Pb and PbO2 in equal moles, as in a charged cell: 2 Pb / (Pb + PbO2). */
  chargedPaste: (2 * M.Pb) / (M.Pb + M.PbO2),
} as const;
