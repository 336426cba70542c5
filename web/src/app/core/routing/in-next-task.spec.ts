import type { Routes } from '@angular/router';
import { pagesInNextTask } from './in-next-task';

class Page {}

describe('lazy pages handed over in a task of their own', () => {
  it('when a lazy page at any depth loads, then the router gets the same component, only a task later', async () => {
    const routes: Routes = pagesInNextTask([
      {
        path: '',
        loadComponent: () => Promise.resolve(Page),
        children: [{ path: 'x', loadComponent: () => Promise.resolve(Page) }],
      },
      { path: 'plain', component: Page },
    ]);
    const order: string[] = [];
    const loaded = (routes[0].children![0].loadComponent!() as Promise<unknown>).then((c) => {
      order.push('page');
      return c;
    });
    await Promise.resolve();
    await Promise.resolve();
    setTimeout(() => order.push('task'));
    expect(order).toEqual([]);
    expect(await loaded).toBe(Page);
    expect(await (routes[0].loadComponent!() as Promise<unknown>)).toBe(Page);
    expect(routes[1]).toEqual({ path: 'plain', component: Page });
  });
});
