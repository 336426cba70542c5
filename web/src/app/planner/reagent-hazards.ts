import { H_STATEMENTS, H_STATEMENTS_SOURCE } from './ghs-h-statements';
import { REAGENT_HAZARDS, REAGENT_HAZARDS_SOURCE, type ReagentHazardEntry } from './reagent-hazards.data';

export { H_STATEMENTS_SOURCE, REAGENT_HAZARDS_SOURCE };

/** What the user typed for one stock. */
export interface ReagentQuery {
  name: string;
  cas?: string;
}

/** One hazard statement as shown: code and text. */
export interface HazardStatement {
  code: string;
  text: string;
}

export type ReagentCaution =
  | {
      kind: 'known';
      query: ReagentQuery;
      entry: ReagentHazardEntry;
      matchedBy: 'cas' | 'name';
      statements: HazardStatement[];
    }
  | { kind: 'unknown'; query: ReagentQuery };

/** Shown for any reagent the table does not hold. */
export const GENERAL_CAUTION =
  'Not in the app’s short table: treat it as hazardous until its safety data sheet says otherwise, and read the SDS before use.';

/** Shown with every reagent list: the table is a convenience, the SDS rules. */
export const TABLE_DISCLAIMER =
  'This table is a convenience, written from memory and not checked for your supplier or concentration. The safety data sheet of the reagent you use, your local rules and your lab’s procedures always take precedence.';

/** "7647-01-0" from " 7647 01 0 " or "7647–01–0"; null when it is not a well-formed CAS number. */
export function normaliseCas(raw: string): string | null {
  const digits = raw.replace(/[\s\-‐‑–—]/g, '');
  if (!/^\d{5,10}$/.test(digits)) return null;
  return `${digits.slice(0, -3)}-${digits.slice(-3, -1)}-${digits.slice(-1)}`;
}

/**
 * CAS check digit: the last digit equals the sum of the other digits, each weighted by its position
 * counted from the right (1, 2, 3, …), modulo 10 (CAS Registry Number format, as published by CAS).
 */
export function casCheckDigitValid(cas: string): boolean {
  const n = normaliseCas(cas);
  if (!n) return false;
  const digits = n.replace(/-/g, '');
  const body = digits.slice(0, -1).split('').reverse();
  const sum = body.reduce((acc, d, i) => acc + Number(d) * (i + 1), 0);
  return sum % 10 === Number(digits.slice(-1));
}

/** Lower case, "(iii)" and "(III)" alike, "sulphate" = "sulfate", no spaces, hyphens or punctuation. */
export function normaliseReagentName(raw: string): string {
  return raw
    .normalize('NFKC')
    .toLowerCase()
    .replace(/sulph/g, 'sulf')
    .replace(/aluminium/g, 'aluminum')
    .replace(/[\s\-‐‑–—_,.'’()[\]·]/g, '');
}

const BY_CAS = new Map<string, ReagentHazardEntry>();
const BY_NAME = new Map<string, ReagentHazardEntry>();
for (const entry of REAGENT_HAZARDS) {
  for (const cas of [entry.cas, ...(entry.otherCas ?? [])]) BY_CAS.set(cas, entry);
  for (const name of [entry.name, ...entry.synonyms]) BY_NAME.set(normaliseReagentName(name), entry);
}

/** The statements of a list of H-codes, texts from the one H-statement table. */
export function hazardStatements(codes: readonly string[]): HazardStatement[] {
  return codes.map((code) => {
    const text = H_STATEMENTS[code];
    if (!text) throw new Error(`No text for hazard statement ${code}.`);
    return { code, text };
  });
}

/** The table's entry for a reagent: by CAS number first, then by its normalised name or a synonym. */
export function lookupReagent(query: ReagentQuery): ReagentCaution {
  const cas = query.cas ? normaliseCas(query.cas) : null;
  const byCas = cas ? BY_CAS.get(cas) : undefined;
  if (byCas) return known(query, byCas, 'cas');
  const byName = query.name.trim() ? BY_NAME.get(normaliseReagentName(query.name)) : undefined;
  if (byName) return known(query, byName, 'name');
  return { kind: 'unknown', query };
}

function known(query: ReagentQuery, entry: ReagentHazardEntry, matchedBy: 'cas' | 'name'): ReagentCaution {
  return { kind: 'known', query, entry, matchedBy, statements: hazardStatements(entry.hCodes) };
}
