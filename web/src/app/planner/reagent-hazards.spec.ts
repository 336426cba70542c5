import { H_STATEMENTS } from './ghs-h-statements';
import { REAGENT_HAZARDS } from './reagent-hazards.data';
import {
  GENERAL_CAUTION,
  casCheckDigitValid,
  hazardStatements,
  lookupReagent,
  normaliseCas,
  normaliseReagentName,
} from './reagent-hazards';

describe('reagent hazard lookup', () => {
  it('finds a reagent by CAS number first, in any spacing or dash', () => {
    for (const cas of ['7647-01-0', ' 7647 01 0 ', '7647–01–0', '7647010']) {
      const c = lookupReagent({ name: 'whatever we call it', cas });
      expect(c.kind).toBe('known');
      if (c.kind === 'known') {
        expect(c.entry.name).toBe('Hydrochloric acid');
        expect(c.matchedBy).toBe('cas');
      }
    }
  });

  it('prefers the CAS number over a name that names another reagent', () => {
    const c = lookupReagent({ name: 'ethanol', cas: '67-56-1' });
    expect(c.kind === 'known' && c.entry.name).toBe('Methanol');
  });

  it('finds a hydrate by its own CAS number', () => {
    const c = lookupReagent({ name: '', cas: '10025-77-1' }); // iron(III) chloride hexahydrate
    expect(c.kind === 'known' && c.entry.name).toBe('Iron(III) chloride');
  });

  it.each([
    ['Iron(III) nitrate', 'Iron(III) nitrate nonahydrate'],
    ['iron (iii) nitrate', 'Iron(III) nitrate nonahydrate'],
    ['  FERRIC NITRATE ', 'Iron(III) nitrate nonahydrate'],
    ['potassium thiocyanate', 'Potassium thiocyanate'],
    ['KSCN', 'Potassium thiocyanate'],
    ['copper sulphate', 'Copper(II) sulfate pentahydrate'],
    ['Sulphuric acid', 'Sulfuric acid'],
    ['1,10-phenanthroline', '1,10-Phenanthroline'],
    ['o-Phenanthroline', '1,10-Phenanthroline'],
  ])('finds "%s" by name as %s', (name, expected) => {
    const c = lookupReagent({ name });
    expect(c.kind).toBe('known');
    if (c.kind === 'known') {
      expect(c.entry.name).toBe(expected);
      expect(c.matchedBy).toBe('name');
    }
  });

  it('gives the general caution for an unknown reagent, an empty name or an unknown CAS number', () => {
    expect(lookupReagent({ name: 'Reagent X-17' }).kind).toBe('unknown');
    expect(lookupReagent({ name: '' }).kind).toBe('unknown');
    expect(lookupReagent({ name: 'my ligand', cas: '50-00-0' }).kind).toBe('unknown');
    expect(GENERAL_CAUTION).toMatch(/safety data sheet/);
  });

  it('shows the statements of a known reagent with their texts', () => {
    const c = lookupReagent({ name: 'sodium hydroxide' });
    expect(c.kind === 'known' && c.statements).toEqual([
      { code: 'H290', text: 'May be corrosive to metals' },
      { code: 'H314', text: 'Causes severe skin burns and eye damage' },
    ]);
  });

  it('normalises CAS numbers and names', () => {
    expect(normaliseCas('64175')).toBe('64-17-5');
    expect(normaliseCas('not a number')).toBeNull();
    expect(normaliseReagentName('Copper(II) Sulphate')).toBe(normaliseReagentName('copper ii sulfate'));
  });
});

describe('reagent hazard table', () => {
  it('holds 15 to 25 reagents, each marked as written from memory', () => {
    expect(REAGENT_HAZARDS.length).toBeGreaterThanOrEqual(15);
    expect(REAGENT_HAZARDS.length).toBeLessThanOrEqual(25);
    for (const r of REAGENT_HAZARDS) expect(r.fromMemory).toBe(true);
  });

  it('has only valid CAS numbers (check digit as CAS defines it)', () => {
    // Check-digit rule: CAS Registry Number format (cas.org); e.g. water 7732-18-5 is valid.
    expect(casCheckDigitValid('7732-18-5')).toBe(true);
    expect(casCheckDigitValid('7732-18-4')).toBe(false);
    for (const r of REAGENT_HAZARDS)
      for (const cas of [r.cas, ...(r.otherCas ?? [])])
        expect([r.name, cas, casCheckDigitValid(cas)]).toEqual([r.name, cas, true]);
  });

  it('has no CAS number or name twice', () => {
    const cas = REAGENT_HAZARDS.flatMap((r) => [r.cas, ...(r.otherCas ?? [])]);
    expect(new Set(cas).size).toBe(cas.length);
    const names = REAGENT_HAZARDS.flatMap((r) => [r.name, ...r.synonyms].map(normaliseReagentName));
    expect(new Set(names).size).toBe(names.length);
  });

  it('takes every H-code text from the one H-statement table', () => {
    for (const r of REAGENT_HAZARDS) {
      for (const code of r.hCodes)
        expect([r.name, code, H_STATEMENTS[code]]).toEqual([r.name, code, expect.any(String)]);
      expect(hazardStatements(r.hCodes).map((s) => s.text)).toEqual(r.hCodes.map((c) => H_STATEMENTS[c]));
    }
  });

  it('words the statements as UN GHS Rev. 10 Annex 3 does (from memory)', () => {
    // UN GHS Rev. 10 (2023), Annex 3, Table A3.1.1 / A3.1.2 / A3.1.3 — texts recalled from memory.
    expect(H_STATEMENTS['H290']).toBe('May be corrosive to metals');
    expect(H_STATEMENTS['H314']).toBe('Causes severe skin burns and eye damage');
    expect(H_STATEMENTS['H318']).toBe('Causes serious eye damage');
    expect(H_STATEMENTS['H319']).toBe('Causes serious eye irritation');
    expect(H_STATEMENTS['H225']).toBe('Highly flammable liquid and vapour');
    expect(H_STATEMENTS['H272']).toBe('May intensify fire; oxidizer');
    expect(H_STATEMENTS['H410']).toBe('Very toxic to aquatic life with long lasting effects');
    for (const code of Object.keys(H_STATEMENTS)) expect(code).toMatch(/^H[234]\d\d$/);
  });
});
