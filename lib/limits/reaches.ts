/**
 * Whether a value has reached a threshold ("equal to or greater than"). Totals are float sums of many
 * entries and can land a hair under the true figure (4 999.999 999 999 for 5 000), so a relative
 * tolerance of one part in 10⁹ (5 mg at 5 000 kg) counts as reached.
 */
export const reaches = (value: number, threshold: number): boolean => value >= threshold * (1 - 1e-9);
