/**
 * Hazard statements (H-codes) and their texts, the one table of texts the planner's reagent cautions use.
 *
 * Source: UN Globally Harmonized System of Classification and Labelling of Chemicals (GHS), Rev. 10 (2023),
 * Annex 3, Section 1 (codification of hazard statements). Texts written FROM MEMORY of that annex and
 * shortened where the annex leaves a route or organ to be stated; check them against the published annex.
 */
export const H_STATEMENTS: Readonly<Record<string, string>> = {
  H225: 'Highly flammable liquid and vapour',
  H226: 'Flammable liquid and vapour',
  H271: 'May cause fire or explosion; strong oxidizer',
  H272: 'May intensify fire; oxidizer',
  H290: 'May be corrosive to metals',
  H301: 'Toxic if swallowed',
  H302: 'Harmful if swallowed',
  H311: 'Toxic in contact with skin',
  H312: 'Harmful in contact with skin',
  H314: 'Causes severe skin burns and eye damage',
  H315: 'Causes skin irritation',
  H317: 'May cause an allergic skin reaction',
  H318: 'Causes serious eye damage',
  H319: 'Causes serious eye irritation',
  H330: 'Fatal if inhaled',
  H331: 'Toxic if inhaled',
  H332: 'Harmful if inhaled',
  H334: 'May cause allergy or asthma symptoms or breathing difficulties if inhaled',
  H335: 'May cause respiratory irritation',
  H340: 'May cause genetic defects',
  H341: 'Suspected of causing genetic defects',
  H350: 'May cause cancer',
  H351: 'Suspected of causing cancer',
  H360: 'May damage fertility or the unborn child',
  H361: 'Suspected of damaging fertility or the unborn child',
  H370: 'Causes damage to organs',
  H372: 'Causes damage to organs through prolonged or repeated exposure',
  H373: 'May cause damage to organs through prolonged or repeated exposure',
  H400: 'Very toxic to aquatic life',
  H410: 'Very toxic to aquatic life with long lasting effects',
  H411: 'Toxic to aquatic life with long lasting effects',
  H412: 'Harmful to aquatic life with long lasting effects',
};

/** Where the texts come from, as the page names it. */
export const H_STATEMENTS_SOURCE = 'UN GHS Rev. 10, Annex 3 (hazard statements)';
