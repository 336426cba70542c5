import { NAV_ITEMS, navItemsFor } from './navigation';

describe('navigation by role', () => {
  it('shows People to admins only', () => {
    expect(navItemsFor('admin').map((i) => i.label)).toContain('People');
    expect(navItemsFor('lab_manager').map((i) => i.label)).not.toContain('People');
    expect(navItemsFor('scientist').map((i) => i.label)).not.toContain('People');
  });

  it('shows nothing to nobody', () => {
    expect(navItemsFor(undefined)).toEqual([]);
  });

  it('gives every entry at least one role and a unique path', () => {
    expect(new Set(NAV_ITEMS.map((i) => i.path)).size).toBe(NAV_ITEMS.length);
    for (const item of NAV_ITEMS) expect(item.roles.length).toBeGreaterThan(0);
  });
});
