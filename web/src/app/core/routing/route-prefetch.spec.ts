import type { Routes } from '@angular/router';
import { routes } from '../../app.routes';
import { routesFor } from './route-prefetch';

describe('routes a URL renders (for loading their code early)', () => {
  const titles = (url: string) => routesFor(routes, url).map((r) => r.title ?? `(${r.path})`);

  it('when a batch is opened, then the shell and the batch page are found', () => {
    expect(titles('/batches/12')).toEqual(['()', 'Batch · Equilight']);
    expect(titles('/batches/12?tab=qc#k')).toEqual(['()', 'Batch · Equilight']);
  });

  it('when a fixed path shares its start with a parameter route, then the earlier route wins as in the router', () => {
    expect(titles('/batches/new')).toEqual(['()', 'New batch · Equilight']);
    expect(titles('/batches')).toEqual(['()', 'Batches · Equilight']);
  });

  it('when the overview or a page outside the shell is opened, then only that is found', () => {
    expect(titles('/')).toEqual(['()', 'Overview · Equilight']);
    expect(titles('/sign-in')).toEqual(['Sign in · Equilight']);
  });

  it('when nothing matches, then nothing is loaded', () => {
    const local: Routes = [{ path: 'a/:id', loadComponent: () => Promise.reject(new Error('unused')) }];
    expect(routesFor(local, '/b/1')).toEqual([]);
    expect(routesFor(local, '/a/1/extra')).toEqual([]);
  });
});
