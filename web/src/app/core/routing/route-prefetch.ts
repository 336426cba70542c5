import type { Route, Routes } from '@angular/router';

/** The routes whose components a URL renders, outermost first (`:param` matches any one segment). */
export function routesFor(routes: Routes, url: string): Route[] {
  const segments = url.split(/[?#]/)[0].split('/').filter(Boolean);
  const walk = (list: Routes, rest: string[]): Route[] | null => {
    for (const route of list) {
      if (route.redirectTo !== undefined || route.matcher) continue;
      const parts = (route.path ?? '').split('/').filter(Boolean);
      if (parts.length > rest.length) continue;
      if (!parts.every((p, i) => p.startsWith(':') || p === rest[i])) continue;
      const remaining = rest.slice(parts.length);
      if (route.children) {
        const inner = walk(route.children, remaining);
        if (inner) return [route, ...inner];
      }
      if (remaining.length === 0 && (route.pathMatch !== 'full' || parts.length === rest.length))
        return [route];
    }
    return null;
  };
  return walk(routes, segments) ?? [];
}

/**
 * Starts loading the code of the page being opened while the app still checks who is signed in: the
 * router asks for the same chunks a moment later and gets them from the module map, not the network.
 */
export function prefetchRouteChunks(routes: Routes, url: string): void {
  for (const route of routesFor(routes, url)) {
    try {
      const loading = route.loadComponent?.();
      if (loading instanceof Promise) loading.catch(() => undefined);
    } catch {
      // The router reports a chunk that fails to load when it gets there.
    }
  }
}
