import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { type NamedReagent, ReagentCautions, cautionLine } from './reagent-cautions';
import { lookupReagent } from './reagent-hazards';

@Component({
  imports: [ReagentCautions],
  template: `<eq-reagent-cautions [reagents]="reagents()" />`,
})
class Host {
  readonly reagents = signal<NamedReagent[]>([]);
}

describe('ReagentCautions', () => {
  async function render(reagents: NamedReagent[]) {
    TestBed.configureTestingModule({ imports: [Host] });
    const fixture = TestBed.createComponent(Host);
    fixture.componentInstance.reagents.set(reagents);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('shows the H-statements of known reagents and the general caution for unknown ones', async () => {
    const el = await render([
      { role: 'Stock A', name: 'ferric nitrate', cas: '' },
      { role: 'Stock B', name: 'anything', cas: '333-20-0' },
      { role: 'Diluent', name: 'Buffer Q7', cas: '' },
    ]);
    const items = [...el.querySelectorAll('[data-testid="reagent-caution"]')].map((li) =>
      li.textContent!.replace(/\s+/g, ' ').trim(),
    );
    expect(items).toHaveLength(3);
    expect(items[0]).toContain('Iron(III) nitrate nonahydrate (CAS 7782-61-8, matched by name)');
    expect(items[0]).toContain('H272 May intensify fire; oxidizer');
    expect(items[1]).toContain('Potassium thiocyanate (CAS 333-20-0, matched by CAS number)');
    expect(items[1]).toContain('EUH032');
    expect(items[2]).toContain('Buffer Q7');
    expect(el.querySelector('[data-testid="general-caution"]')!.textContent).toContain('safety data sheet');
  });

  it('names the sources and says the SDS takes precedence', async () => {
    const el = await render([{ role: 'Stock A', name: 'water', cas: '' }]);
    const source = el.querySelector('[data-testid="reagent-source"]')!.textContent!;
    expect(source).toContain('UN GHS Rev. 10, Annex 3');
    expect(source).toContain('ECHA C&L Inventory');
    expect(source).toContain('safety data sheet');
    expect(source).toContain('precedence');
    expect(el.textContent).toContain('not classified as hazardous');
  });

  it('writes one line per reagent for the prep sheet', () => {
    expect(cautionLine('Stock B', lookupReagent({ name: 'sodium hydroxide' }))).toBe(
      'Stock B (Sodium hydroxide, CAS 1310-73-2): H290 May be corrosive to metals; H314 Causes severe skin burns and eye damage.',
    );
    expect(cautionLine('Diluent', lookupReagent({ name: 'Buffer Q7' }))).toMatch(
      /^Diluent \(Buffer Q7\): Not in/,
    );
  });
});
