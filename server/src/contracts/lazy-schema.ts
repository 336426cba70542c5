/**
 * Builds schemas on first use where a page load pays for them: in a browser (a page or a worker). The
 * server builds them as its modules load, once per process, and needs them as they are: the OpenAPI
 * document walks schemas by identity, which a stand-in (below) would break.
 */
const BUILD_ON_FIRST_USE = 'window' in globalThis || 'WorkerGlobalScope' in globalThis;

/**
 * A schema declaration of the contracts. Building zod schemas is most of what evaluating the contracts
 * costs — in the browser about 25 ms of the main thread per page load, for schemas a page mostly never
 * reads — so in a browser the declaration costs nothing until the schema is used, and a bundle that never
 * reads it drops it (the call is marked pure and its argument is a function). On the server the schema is
 * built at once. Values that take a schema to compute (the defaults a schema parses to, a shape of
 * schemas) are declared the same way.
 *
 * The browser's value stands in for the schema everywhere: property reads and method calls (`parse`,
 * `shape`, `optional()` …), `instanceof`, `in`, keys and descriptors. What it is not: the same object as
 * the schema built inside it, which nothing the browser does with schemas compares.
 */
export function lazySchema<T extends object>(build: () => T): T {
  return BUILD_ON_FIRST_USE ? standIn(build) : build();
}

function standIn<T extends object>(build: () => T): T {
  let schema: T | undefined;
  const real = (): T => (schema ??= build());
  return new Proxy({} as T, {
    get: (_, key) => Reflect.get(real(), key),
    set: (_, key, value) => Reflect.set(real(), key, value),
    has: (_, key) => Reflect.has(real(), key),
    ownKeys: () => Reflect.ownKeys(real()),
    getOwnPropertyDescriptor: (_, key) => {
      const descriptor = Reflect.getOwnPropertyDescriptor(real(), key);
      // The stand-in's own target has no properties; a proxy may only report configurable ones.
      return descriptor && { ...descriptor, configurable: true };
    },
    defineProperty: (_, key, descriptor) => Reflect.defineProperty(real(), key, descriptor),
    deleteProperty: (_, key) => Reflect.deleteProperty(real(), key),
    getPrototypeOf: () => Reflect.getPrototypeOf(real()),
  });
}
