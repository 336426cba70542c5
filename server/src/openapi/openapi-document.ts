import * as z from 'zod';
import { API_OPERATIONS, type ApiOperation } from '../contracts/routes';

type JsonObject = Record<string, unknown>;

function jsonSchema(schema: z.ZodType, io: 'input' | 'output' = 'input'): JsonObject {
  // Input side: what a client sends. Transforms (trim, lower-case) have no JSON Schema form and are left
  // open, as are the analysis module's large results (typed with z.custom, checked at their top level).
  return z.toJSONSchema(schema, { target: 'openapi-3.0', io, unrepresentable: 'any' }) as JsonObject;
}

function describeAccess(op: ApiOperation): string {
  if (op.access === 'public') return 'No sign-in needed.';
  if (op.access === 'instrument')
    return 'An instrument token (Bearer) or a signed-in admin, lab manager or scientist.';
  if (op.access === 'watcher')
    return 'A watcher credential (Bearer eqw_…) or, where it says so, an instrument token.';
  return `Roles: ${op.access.join(', ')}.`;
}

function queryParameters(schema: z.ZodType): JsonObject[] {
  const properties = (jsonSchema(schema)['properties'] ?? {}) as Record<string, JsonObject>;
  return Object.entries(properties).map(([name, property]) => ({
    name,
    in: 'query',
    required: false,
    schema: property,
  }));
}

const ERROR_RESPONSE = {
  description: 'Error',
  content: {
    'application/json': {
      schema: {
        type: 'object',
        properties: {
          error: {
            type: 'object',
            properties: { code: { type: 'string' }, message: { type: 'string' }, details: {} },
            required: ['code', 'message'],
          },
        },
      },
    },
  },
};

/** The OpenAPI 3 document of the API, generated from the contracts' route table (requests and answers). */
export function buildOpenApiDocument(serverUrl: string): JsonObject {
  const paths: Record<string, JsonObject> = {};
  for (const op of API_OPERATIONS) {
    const pathParams = [...op.path.matchAll(/\{(\w+)\}/g)].map((m) => ({
      name: m[1],
      in: 'path',
      required: true,
      schema: { type: 'integer', minimum: 1 },
    }));
    const content: JsonObject = {};
    if (op.body) content['application/json'] = { schema: jsonSchema(op.body) };
    if (op.multipart) {
      const fields = op.multipart.fields
        ? ((jsonSchema(op.multipart.fields)['properties'] ?? {}) as JsonObject)
        : {};
      content['multipart/form-data'] = {
        schema: {
          type: 'object',
          properties: {
            file: { type: 'string', format: 'binary', description: op.multipart.fileTypes },
            ...fields,
          },
          required: ['file'],
        },
      };
    }
    const operation: JsonObject = {
      tags: [op.tag],
      summary: op.summary,
      description: describeAccess(op),
      operationId: `${op.method}${op.path
        .replace(/[{}]/g, '')
        .replace(/\/(\w)/g, (_m, c: string) => c.toUpperCase())
        .replace(/[^A-Za-z0-9]/g, '')}`,
      parameters: [...pathParams, ...(op.query ? queryParameters(op.query) : [])],
      responses: {
        [op.success[0]]: {
          description: op.success[1],
          ...(op.response
            ? { content: { 'application/json': { schema: jsonSchema(op.response, 'output') } } }
            : {}),
        },
        '4XX': ERROR_RESPONSE,
      },
      security:
        op.access === 'public'
          ? []
          : op.access === 'instrument'
            ? [{ instrumentToken: [] }, { session: [] }]
            : op.access === 'watcher'
              ? [{ watcherToken: [] }, { instrumentToken: [] }]
              : [{ session: [] }],
    };
    if (Object.keys(content).length) operation['requestBody'] = { required: true, content };
    paths[op.path] = { ...(paths[op.path] ?? {}), [op.method]: operation };
  }
  return {
    openapi: '3.0.3',
    info: {
      title: 'Equilight API',
      version: '0.1.0',
      description:
        'Instrument-data hub for UV-Vis absorbance labs. Browser calls use the session cookie and must echo the XSRF-TOKEN cookie in the X-XSRF-TOKEN header on POST, PUT, PATCH and DELETE. Live events: WebSocket at /api/events (session).',
    },
    servers: [{ url: serverUrl }],
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'equilight.sid' },
        instrumentToken: {
          type: 'http',
          scheme: 'bearer',
          description: 'Instrument token (eqt_…) from the Instruments page',
        },
        watcherToken: {
          type: 'http',
          scheme: 'bearer',
          description: 'Watcher credential (eqw_…) from the Instruments page',
        },
      },
    },
    paths,
  };
}
