/**
 * GHS hazard classes of common UV-Vis bench reagents, as a convenience for the planner's cautions.
 *
 * ALL ENTRIES ARE FROM MEMORY of typical supplier safety data sheets and the harmonised classifications;
 * they have not been checked line by line. Check each against the supplier's SDS and the ECHA C&L
 * Inventory (https://echa.europa.eu/information-on-chemicals/cl-inventory-database) before relying on it.
 * Classifications depend on concentration and supplier (an acid's dilute solution is classified less
 * severely than the concentrated reagent); the entry is the usual laboratory-grade reagent as named.
 * The texts of the codes live in ghs-h-statements.ts only.
 */
export interface ReagentHazardEntry {
  /** CAS Registry Number of the form named first; other forms (hydrates) in otherCas. */
  cas: string;
  otherCas?: readonly string[];
  name: string;
  synonyms: readonly string[];
  /** H-codes; empty = not classified as hazardous under GHS (still read the SDS). */
  hCodes: readonly string[];
  /** What the codes do not say (e.g. an EU supplemental statement, a concentration). */
  note?: string;
  fromMemory: true;
}

export const REAGENT_HAZARDS_SOURCE =
  "typical supplier safety data sheets and the ECHA C&L Inventory (entries from memory; check the supplier's SDS)";

export const REAGENT_HAZARDS: readonly ReagentHazardEntry[] = [
  {
    cas: '7782-61-8',
    otherCas: ['10421-48-4'],
    name: 'Iron(III) nitrate nonahydrate',
    synonyms: ['iron(III) nitrate', 'ferric nitrate', 'ferric nitrate nonahydrate', 'Fe(NO3)3'],
    hCodes: ['H272', 'H315', 'H319'],
    fromMemory: true,
  },
  {
    cas: '7705-08-0',
    otherCas: ['10025-77-1'],
    name: 'Iron(III) chloride',
    synonyms: ['ferric chloride', 'iron(III) chloride hexahydrate', 'ferric chloride hexahydrate', 'FeCl3'],
    hCodes: ['H290', 'H302', 'H315', 'H318'],
    fromMemory: true,
  },
  {
    cas: '7783-85-9',
    name: 'Ammonium iron(II) sulfate hexahydrate',
    synonyms: ["Mohr's salt", 'ferrous ammonium sulfate', 'ammonium iron(II) sulfate'],
    hCodes: ['H315', 'H319', 'H335'],
    fromMemory: true,
  },
  {
    cas: '333-20-0',
    name: 'Potassium thiocyanate',
    synonyms: ['KSCN', 'potassium rhodanide', 'potassium sulfocyanate'],
    hCodes: ['H302', 'H312', 'H332', 'H412'],
    note: 'Contact with acids liberates very toxic gas (EU supplemental statement EUH032).',
    fromMemory: true,
  },
  {
    cas: '1762-95-4',
    name: 'Ammonium thiocyanate',
    synonyms: ['NH4SCN', 'ammonium rhodanide'],
    hCodes: ['H302', 'H312', 'H332', 'H412'],
    note: 'Contact with acids liberates very toxic gas (EU supplemental statement EUH032).',
    fromMemory: true,
  },
  {
    cas: '7697-37-2',
    name: 'Nitric acid',
    synonyms: ['HNO3', 'nitric acid 65%', 'concentrated nitric acid'],
    hCodes: ['H272', 'H290', 'H314', 'H331'],
    note: 'Concentrated acid (about 65 %); dilute solutions are classified differently.',
    fromMemory: true,
  },
  {
    cas: '7647-01-0',
    name: 'Hydrochloric acid',
    synonyms: ['HCl', 'hydrochloric acid 37%', 'muriatic acid', 'hydrogen chloride solution'],
    hCodes: ['H290', 'H314', 'H335'],
    note: 'Concentrated acid (about 37 %); dilute solutions are classified differently.',
    fromMemory: true,
  },
  {
    cas: '7664-93-9',
    name: 'Sulfuric acid',
    synonyms: ['H2SO4', 'concentrated sulfuric acid'],
    hCodes: ['H290', 'H314'],
    note: 'Concentrated acid; dilute solutions are classified differently. Add acid to water, never water to acid.',
    fromMemory: true,
  },
  {
    cas: '1310-73-2',
    name: 'Sodium hydroxide',
    synonyms: ['NaOH', 'caustic soda', 'sodium hydroxide solution'],
    hCodes: ['H290', 'H314'],
    fromMemory: true,
  },
  {
    cas: '64-19-7',
    name: 'Acetic acid',
    synonyms: ['glacial acetic acid', 'ethanoic acid', 'CH3COOH'],
    hCodes: ['H226', 'H314'],
    note: 'Glacial (about 100 %); dilute solutions are classified differently.',
    fromMemory: true,
  },
  {
    cas: '7778-50-9',
    name: 'Potassium dichromate',
    synonyms: ['K2Cr2O7', 'potassium bichromate'],
    hCodes: ['H272', 'H301', 'H312', 'H314', 'H317', 'H330', 'H334', 'H340', 'H350', 'H360', 'H372', 'H410'],
    note: 'Chromium(VI): carcinogen; many labs require special authorisation and waste handling.',
    fromMemory: true,
  },
  {
    cas: '7722-64-7',
    name: 'Potassium permanganate',
    synonyms: ['KMnO4', 'permanganate of potash'],
    hCodes: ['H272', 'H302', 'H361', 'H373', 'H410'],
    fromMemory: true,
  },
  {
    cas: '7758-99-8',
    otherCas: ['7758-98-7'],
    name: 'Copper(II) sulfate pentahydrate',
    synonyms: ['copper(II) sulfate', 'cupric sulfate', 'copper sulfate', 'blue vitriol', 'CuSO4'],
    hCodes: ['H302', 'H315', 'H319', 'H410'],
    fromMemory: true,
  },
  {
    cas: '10101-97-0',
    otherCas: ['7786-81-4'],
    name: 'Nickel(II) sulfate hexahydrate',
    synonyms: ['nickel(II) sulfate', 'nickel sulfate', 'NiSO4'],
    hCodes: ['H302', 'H315', 'H317', 'H332', 'H334', 'H341', 'H350', 'H360', 'H372', 'H410'],
    fromMemory: true,
  },
  {
    cas: '7791-13-1',
    otherCas: ['7646-79-9'],
    name: 'Cobalt(II) chloride hexahydrate',
    synonyms: ['cobalt(II) chloride', 'cobaltous chloride', 'cobalt chloride', 'CoCl2'],
    hCodes: ['H302', 'H317', 'H334', 'H341', 'H350', 'H360', 'H410'],
    fromMemory: true,
  },
  {
    cas: '66-71-7',
    otherCas: ['5144-89-8'],
    name: '1,10-Phenanthroline',
    synonyms: ['o-phenanthroline', '1,10-phenanthroline monohydrate', 'phen'],
    hCodes: ['H301', 'H410'],
    fromMemory: true,
  },
  {
    cas: '5470-11-1',
    name: 'Hydroxylamine hydrochloride',
    synonyms: ['hydroxylammonium chloride', 'NH2OH·HCl'],
    hCodes: ['H290', 'H302', 'H312', 'H315', 'H317', 'H319', 'H351', 'H373', 'H400'],
    fromMemory: true,
  },
  {
    cas: '69-72-7',
    name: 'Salicylic acid',
    synonyms: ['2-hydroxybenzoic acid'],
    hCodes: ['H302', 'H318', 'H361'],
    fromMemory: true,
  },
  {
    cas: '64-17-5',
    name: 'Ethanol',
    synonyms: ['ethyl alcohol', 'EtOH', 'absolute ethanol'],
    hCodes: ['H225', 'H319'],
    fromMemory: true,
  },
  {
    cas: '67-56-1',
    name: 'Methanol',
    synonyms: ['methyl alcohol', 'MeOH'],
    hCodes: ['H225', 'H301', 'H311', 'H331', 'H370'],
    fromMemory: true,
  },
  {
    cas: '75-05-8',
    name: 'Acetonitrile',
    synonyms: ['methyl cyanide', 'MeCN', 'ethanenitrile'],
    hCodes: ['H225', 'H302', 'H312', 'H319', 'H332'],
    fromMemory: true,
  },
  {
    cas: '127-09-3',
    otherCas: ['6131-90-4'],
    name: 'Sodium acetate',
    synonyms: ['sodium acetate trihydrate', 'sodium ethanoate'],
    hCodes: [],
    fromMemory: true,
  },
  {
    cas: '7447-40-7',
    name: 'Potassium chloride',
    synonyms: ['KCl'],
    hCodes: [],
    fromMemory: true,
  },
  {
    cas: '7732-18-5',
    name: 'Water',
    synonyms: ['deionised water', 'deionized water', 'distilled water', 'DI water', 'H2O'],
    hCodes: [],
    fromMemory: true,
  },
];
