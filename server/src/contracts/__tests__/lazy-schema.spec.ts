import { types } from 'node:util';
import * as z from 'zod';
import * as eager from '../index';
import { lazySchema } from '../lazy-schema';

type Contracts = typeof eager;

/** `load()` run on fresh copies of the modules, as in a browser: with a `window` in sight. */
function asInBrowser<T>(load: () => T): T {
  let loaded: T | undefined;
  const scope = globalThis as { window?: unknown };
  scope.window = globalThis;
  try {
    jest.isolateModules(() => {
      loaded = load();
    });
  } finally {
    delete scope.window;
  }
  return loaded!;
}

const isSchema = (value: unknown): value is z.ZodType =>
  typeof value === 'object' && value !== null && '_zod' in value && 'safeParse' in value;

/** Values of every shape a client might send, good or bad. */
const PROBES: unknown[] = [
  undefined,
  null,
  {},
  [],
  '',
  'A1',
  ' Some Name ',
  'lab@example.org',
  0,
  -1,
  1.5,
  true,
  { id: 1, name: 'x' },
  [{ position: 'A1', role: 'blank' }],
];

const outcome = (result: z.ZodSafeParseResult<unknown>) =>
  result.success ? { data: result.data } : { issues: result.error.issues };

describe('schemas built on first use (as in a browser)', () => {
  const browser = asInBrowser(() => jest.requireActual<Contracts>('../index'));
  const schemaNames = Object.keys(eager).filter((k) => isSchema(eager[k as keyof Contracts]));

  it('the contracts declare their schemas through it', () => {
    expect(schemaNames.length).toBeGreaterThan(60);
    // On the server each is the schema itself; in a browser each is a stand-in until first used.
    for (const name of schemaNames) {
      expect(types.isProxy(eager[name as keyof Contracts])).toBe(false);
      expect(types.isProxy(browser[name as keyof Contracts])).toBe(true);
    }
  });

  it('a stand-in answers every probe exactly as the schema built at once', () => {
    for (const name of schemaNames) {
      const built = eager[name as keyof Contracts] as z.ZodType;
      const standIn = browser[name as keyof Contracts] as z.ZodType;
      for (const probe of PROBES) {
        expect({ name, ...outcome(standIn.safeParse(probe)) }).toEqual({
          name,
          ...outcome(built.safeParse(probe)),
        });
      }
    }
  });

  it('a stand-in is what its schema is: type checks, shape, options, derived schemas', () => {
    expect(browser.batchSettingsSchema instanceof z.ZodObject).toBe(true);
    expect(browser.roleSchema instanceof z.ZodEnum).toBe(true);
    expect(browser.liveEventSchema instanceof z.ZodDiscriminatedUnion).toBe(true);
    expect(Object.keys(browser.batchSettingsSchema.shape)).toEqual(
      Object.keys(eager.batchSettingsSchema.shape),
    );
    expect(browser.roleSchema.options).toEqual(eager.roleSchema.options);
    expect('shape' in browser.batchSchema).toBe(true);
    expect(Object.getPrototypeOf(browser.batchSchema)).toBe(
      Object.getPrototypeOf(browser.batchSchema.extend({})),
    );
    const change = { r2Min: 0.98, exclusions: [{ position: 'b2', reason: 'bubble' }] };
    expect(browser.batchSettingsSchema.partial().parse(change)).toEqual(
      eager.batchSettingsSchema.partial().parse(change),
    );
  });

  it('values derived from a schema are the same, and as read-only', () => {
    expect({ ...browser.DEFAULT_BATCH_SETTINGS }).toEqual({ ...eager.DEFAULT_BATCH_SETTINGS });
    expect(JSON.parse(JSON.stringify(browser.DEFAULT_PARSING_RULES))).toEqual(
      JSON.parse(JSON.stringify(eager.DEFAULT_PARSING_RULES)),
    );
    expect(() => {
      (browser.DEFAULT_BATCH_SETTINGS as { r2Min: number }).r2Min = 0;
    }).toThrow(TypeError);
    expect(browser.DEFAULT_BATCH_SETTINGS.r2Min).toBe(eager.DEFAULT_BATCH_SETTINGS.r2Min);
  });

  it('builds once, on first use, and not before', () => {
    const build = jest.fn(() => z.object({ a: z.number() }));
    const schema = asInBrowser(() =>
      jest.requireActual<{ lazySchema: typeof lazySchema }>('../lazy-schema').lazySchema(build),
    );
    expect(build).not.toHaveBeenCalled();
    expect(schema.parse({ a: 1 })).toEqual({ a: 1 });
    expect(schema.safeParse({ a: 'x' }).success).toBe(false);
    expect(build).toHaveBeenCalledTimes(1);
  });

  it('on the server a declaration is the schema, built at once', () => {
    const build = jest.fn(() => z.string());
    const schema = lazySchema(build);
    expect(build).toHaveBeenCalledTimes(1);
    expect(types.isProxy(schema)).toBe(false);
  });
});
