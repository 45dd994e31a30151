/**
 * The safety cautions the cellar screens and the sanitation audit PDF show (PRODUCT.md
 * "Safety cautions to show"). One wording everywhere; each defers to local codes and licensed
 * practice.
 */

export const deferToLocalCodes =
  'These cautions are reminders, not approvals: local codes, the gas supplier and equipment makers’ instructions and licensed practice govern.';

export const pressureCautions = [
  'Never exceed a keg’s or regulator’s rated pressure; keep every pressure-relief valve present and working, and vent a keg to zero before opening it.',
  'Chain or strap CO2 cylinders upright, away from heat, and always gas a keg through a regulator.',
  'CO2 displaces air in closed cold rooms and pools low: keep the room ventilated and its CO2 alarm working; leave at once if it sounds.',
] as const;

export const chemicalCautions = [
  'Wear gloves and eye protection when handling alkaline cleaners and acid sanitizers; mix to label strength.',
  'Add chemical to water, never water to chemical.',
  'Never mix chlorine-based products with acids (or with ammonia), and never mix alkaline cleaners with acids.',
  'Vent a keg or fermenter to atmospheric pressure before a caustic clean: caustic absorbs CO2 and can collapse a closed vessel.',
] as const;

/** The warning beside a clean with a caustic chemical (the checklist requires the vent to be confirmed). */
export const causticCo2Warning =
  'Caustic in a vessel still full of CO2 absorbs the gas and can pull a vacuum strong enough to collapse the vessel. Vent it to atmospheric pressure first, and leave it open to air while the caustic is in it. Caustic burns skin and eyes: wear eye protection and chemical-resistant gloves, and follow the label and local codes.';

export const alcoholCaution = 'Alcohol figures for labels and tax: local rules govern what must be measured, shown and kept.';

export const carbonationCautions = [
  'Shaking or rolling a keg at high pressure easily over-carbonates it; lower a fast start to serving pressure on time.',
  ...pressureCautions,
] as const;
