/**
 * Shown beside the switch: the switch states a legal conclusion, so it carries its source and the caution
 * (DESIGN.md §6). Source: EPA EPCRA FAQs on batteries (REFERENCES.md, "consumer-product exemption").
 */
export const EXEMPTION_HINT =
  "Turn on only where the batteries are held for sale to the public as consumer products (for example car batteries in a store): " +
  "EPA's EPCRA guidance treats those as exempt from Tier II reporting; industrial batteries (forklift, telecom) are not. " +
  "Local, state and national rules may be stricter; confirm with the authority having jurisdiction.";
